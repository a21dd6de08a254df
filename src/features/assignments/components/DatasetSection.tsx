import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useDropzone, type FileRejection } from 'react-dropzone';
import { useForm } from 'react-hook-form';
import { scenarioDatasetBody, scenarioLabels, scenarioNamesList, type DatasetDetail, type ScenarioDatasetBody } from '../../../../shared/assignment';
import { Button } from '../../../components/Button';
import { ErrorBanner } from '../../../components/ErrorBanner';
import { Loading } from '../../../components/Loading';
import { DatasetPicture } from '../../../components/plots/DatasetPicture';
import { ApiError } from '../../../lib/http';
import { formatBytes, formatReal } from '../../../lib/numbers';
import { useDataset, useDatasets, useScenarioDataset, useUploadDataset } from '../api';
import { InputField, SelectField } from './inputs';

type Mode = 'pick' | 'upload' | 'scenario';

const num = (v: unknown) => (v === '' || v === null || v === undefined ? undefined : Number(v));

/** Choose the dataset of an assignment: one of the course's, a new upload, or a scenario generated on the server. */
export function DatasetSection({ courseId, value, onChange, error, readOnly }: { courseId: number; value: number | undefined; onChange: (id: number) => void; error?: string; readOnly: boolean }) {
  const list = useDatasets(courseId);
  const [mode, setMode] = useState<Mode>('pick');
  const tabs: [Mode, string][] = [
    ['pick', 'Use one of this course'],
    ['upload', 'Upload a file'],
    ['scenario', 'Generate from a scenario'],
  ];
  const picked = (d: DatasetDetail) => {
    onChange(d.id);
    setMode('pick');
  };
  return (
    <div className="flex flex-col gap-4">
      {!readOnly && (
        <div role="radiogroup" aria-label="Where the dataset comes from" className="inline-flex w-fit flex-wrap gap-1 rounded-md border border-line bg-surface-sunken/60 p-1">
          {tabs.map(([m, l]) => (
            <button
              key={m}
              type="button"
              role="radio"
              aria-checked={mode === m}
              onClick={() => setMode(m)}
              className={`rounded px-2.5 py-1 text-sm ${mode === m ? 'bg-surface-raised font-medium text-ink shadow-sm' : 'text-muted hover:text-ink'}`}
            >
              {l}
            </button>
          ))}
        </div>
      )}
      {mode === 'pick' &&
        (list.isPending ? (
          <Loading what="datasets" />
        ) : list.error ? (
          <ErrorBanner error={list.error} title="The datasets could not be loaded" />
        ) : (
          <SelectField
            label="Dataset"
            value={value === undefined ? '' : String(value)}
            disabled={readOnly}
            onChange={(e) => e.target.value && onChange(Number(e.target.value))}
            error={error}
            hint={list.data.datasets.length === 0 ? 'This course has no datasets yet: upload one or generate one from a scenario.' : undefined}
            options={[
              ['', list.data.datasets.length === 0 ? '— none yet —' : '— choose a dataset —'],
              ...list.data.datasets.map(
                (d) => [String(d.id), `${d.name} · ${d.n}×${d.snapshots}${d.pairs ? ' pairs' : ''} · ${d.source === 'scenario' ? 'scenario' : d.format}`] as const,
              ),
            ]}
          />
        ))}
      {mode === 'upload' && <UploadForm courseId={courseId} maxBytes={list.data?.maxUploadBytes} onDone={picked} />}
      {mode === 'scenario' && <ScenarioForm courseId={courseId} onDone={picked} />}
      {mode !== 'pick' && error && <p className="text-xs font-medium text-danger">{error}</p>}
      {value !== undefined && <DatasetCard courseId={courseId} id={value} />}
    </div>
  );
}

function DatasetCard({ courseId, id }: { courseId: number; id: number }) {
  const d = useDataset(courseId, id);
  if (d.isPending) return <Loading what="the dataset" />;
  if (d.error) return <ErrorBanner error={d.error} title="The dataset could not be loaded" />;
  const ds = d.data;
  return (
    <div className="grid grid-cols-[minmax(0,1fr)] gap-4 rounded-md border border-line bg-surface p-3 md:grid-cols-[minmax(0,15rem)_minmax(0,1fr)]" data-testid="dataset-card">
      <dl className="grid h-fit grid-cols-[max-content_1fr] gap-x-4 gap-y-1 text-sm">
        <dt className="text-muted">Name</dt>
        <dd className="font-medium break-words">{ds.name}</dd>
        <dt className="text-muted">Shape</dt>
        <dd className="tabular">
          {ds.n} states × {ds.snapshots} snapshots
        </dd>
        <dt className="text-muted">Kind</dt>
        <dd>{ds.pairs ? 'explicit pairs (X, Y)' : 'one trajectory'}</dd>
        <dt className="text-muted">Layout</dt>
        <dd>one snapshot per {ds.layout === 'columns' ? 'column' : 'row'}</dd>
        <dt className="text-muted">dt</dt>
        <dd className="tabular">{ds.dt === null ? 'not given' : formatReal(ds.dt, 4)}</dd>
        <dt className="text-muted">Source</dt>
        <dd>{ds.scenario ? `scenario ${ds.scenario.name}, seed ${ds.scenario.seed}, noise ${ds.scenario.noise}` : `upload (${ds.format}, ${formatBytes(ds.bytes)})`}</dd>
        <dt className="text-muted">sha256</dt>
        <dd className="font-mono text-xs" title={ds.sha256}>
          {ds.sha256.slice(0, 12)}…
        </dd>
      </dl>
      <div className="min-w-0">
        <DatasetPicture preview={ds.preview} name={ds.name} />
      </div>
    </div>
  );
}

function fileProblem(f: File, maxBytes: number | undefined): string | null {
  if (!/\.(csv|npy)$/i.test(f.name)) return `${f.name}: only CSV (.csv) or NumPy (.npy) files are read`;
  if (maxBytes !== undefined && f.size > maxBytes) return `${f.name} is ${formatBytes(f.size)}; the limit is ${formatBytes(maxBytes)}`;
  if (f.size === 0) return `${f.name} is empty`;
  return null;
}

function Drop({ label, file, onFile, maxBytes, error, hint }: { label: string; file: File | null; onFile: (f: File | null) => void; maxBytes?: number; error?: string; hint: string }) {
  const [local, setLocal] = useState<string | null>(null);
  const onDrop = (accepted: File[], rejected: FileRejection[]) => {
    const f = accepted[0] ?? rejected[0]?.file;
    if (!f) return;
    const p = fileProblem(f, maxBytes);
    setLocal(p);
    onFile(p ? null : f);
  };
  const { getRootProps, getInputProps, isDragActive } = useDropzone({ onDrop, multiple: false, accept: { 'text/csv': ['.csv'], 'application/octet-stream': ['.npy'] } });
  const shown = local ?? error;
  return (
    <div className="flex flex-col gap-1">
      <span className="text-sm font-medium">{label}</span>
      <div
        {...getRootProps({
          'aria-label': `${label}: choose or drop a file`,
          className: `flex cursor-pointer flex-col items-center justify-center gap-1 rounded-md border-2 border-dashed px-4 py-5 text-center text-sm ${
            shown ? 'border-danger bg-danger-soft/40' : isDragActive ? 'border-accent bg-accent-soft' : 'border-line-strong bg-surface-raised hover:bg-surface-sunken/50'
          }`,
        })}
      >
        <input {...getInputProps()} />
        {file ? (
          <span>
            <span className="font-medium">{file.name}</span> <span className="text-muted">({formatBytes(file.size)})</span>
          </span>
        ) : (
          <span>{isDragActive ? 'Drop the file here' : 'Drop a .csv or .npy file here, or click to choose'}</span>
        )}
        <span className="text-xs text-muted">{hint}</span>
      </div>
      {shown && (
        <p className="font-mono text-xs font-medium break-words text-danger" role="alert">
          {shown}
        </p>
      )}
    </div>
  );
}

function UploadForm({ courseId, maxBytes, onDone }: { courseId: number; maxBytes?: number; onDone: (d: DatasetDetail) => void }) {
  const upload = useUploadDataset(courseId);
  const [file, setFile] = useState<File | null>(null);
  const [fileY, setFileY] = useState<File | null>(null);
  const [name, setName] = useState('');
  const [layout, setLayout] = useState<'columns' | 'rows'>('columns');
  const [dt, setDt] = useState('');
  const [missing, setMissing] = useState<string | null>(null);
  const fe = upload.error instanceof ApiError ? upload.error.fieldErrors : {};
  const limit = maxBytes !== undefined ? formatBytes(maxBytes) : 'the site’s limit';
  const submit = () => {
    if (!file) return setMissing('Choose the file of snapshots first');
    if (name.trim().length < 2) return setMissing('Give the dataset a name of at least 2 characters');
    if (dt !== '' && !(Number(dt) > 0)) return setMissing('dt must be a number above 0');
    setMissing(null);
    upload.mutate({ file, fileY, name: name.trim(), layout, dt: dt === '' ? undefined : Number(dt) }, { onSuccess: onDone });
  };
  const unplaced = upload.error && !(upload.error instanceof ApiError && Object.keys(fe).some((k) => ['file', 'fileY', 'name', 'layout', 'dt'].includes(k)));
  return (
    <div className="flex flex-col gap-3 rounded-md border border-line bg-surface p-3">
      <p className="text-sm text-muted">
        CSV (numbers separated by commas, no header) or NumPy .npy (float64), up to <strong className="font-medium text-ink">{limit}</strong> per file. The file is read
        on the server before anything is stored; a problem is shown here with the line and column.
      </p>
      <div className="grid grid-cols-[minmax(0,1fr)] gap-3 md:grid-cols-2">
        <Drop label="Snapshots (X)" file={file} onFile={setFile} maxBytes={maxBytes} error={fe.file} hint={`One trajectory, or X of explicit pairs · at most ${limit}`} />
        <Drop label="Paired snapshots (Y), optional" file={fileY} onFile={setFileY} maxBytes={maxBytes} error={fe.fileY} hint="Only for explicit pairs: column j of Y is one step after column j of X" />
      </div>
      <div className="grid grid-cols-[minmax(0,1fr)] gap-3 sm:grid-cols-3">
        <InputField label="Name" value={name} onChange={(e) => setName(e.target.value)} error={fe.name} wide />
        <SelectField
          label="Layout"
          value={layout}
          onChange={(e) => setLayout(e.target.value as 'columns' | 'rows')}
          error={fe.layout}
          options={[
            ['columns', 'one snapshot per column'],
            ['rows', 'one snapshot per row'],
          ]}
        />
        <InputField label="dt (optional)" type="number" step="any" min="0" value={dt} onChange={(e) => setDt(e.target.value)} error={fe.dt} hint="Time between snapshots" />
      </div>
      {missing && <p className="text-xs font-medium text-danger">{missing}</p>}
      {unplaced && <ErrorBanner error={upload.error} title="The file was not stored" />}
      <div>
        <Button variant="secondary" busy={upload.isPending} onClick={submit}>
          {upload.isPending ? 'Uploading and checking…' : 'Upload and use this dataset'}
        </Button>
      </div>
    </div>
  );
}

function ScenarioForm({ courseId, onDone }: { courseId: number; onDone: (d: DatasetDetail) => void }) {
  const create = useScenarioDataset(courseId);
  const form = useForm<ScenarioDatasetBody, unknown, ScenarioDatasetBody>({
    resolver: zodResolver(scenarioDatasetBody),
    defaultValues: { name: 'Linear field', scenario: 'linear-field', seed: 1, noise: 0, samples: undefined },
  });
  const { errors } = form.formState;
  const scenario = form.watch('scenario');
  const submit = form.handleSubmit((body) =>
    create.mutate(body, {
      onSuccess: onDone,
      onError: (err) => {
        if (err instanceof ApiError) for (const [k, m] of Object.entries(err.fieldErrors)) form.setError(k as keyof ScenarioDatasetBody, { type: 'server', message: m });
      },
    }),
  );
  return (
    <div className="flex flex-col gap-3 rounded-md border border-line bg-surface p-3">
      <SelectField
        label="Scenario"
        {...form.register('scenario', {
          onChange: (e) => {
            const label = scenarioLabels[e.target.value as keyof typeof scenarioLabels].split(':')[0];
            if (!form.formState.dirtyFields.name) form.setValue('name', label);
          },
        })}
        error={errors.scenario?.message}
        options={scenarioNamesList.map((s) => [s, scenarioLabels[s].split(':')[0]] as const)}
        hint={scenarioLabels[scenario]?.split(': ').slice(1).join(': ')}
      />
      <div className="grid grid-cols-2 gap-3 sm:grid-cols-4">
        <InputField label="Name" {...form.register('name')} error={errors.name?.message} wide className="col-span-2 sm:col-span-1" />
        <InputField label="Seed" type="number" step="1" {...form.register('seed', { setValueAs: num })} error={errors.seed?.message} hint="Same seed, same data" />
        <InputField label="Noise" type="number" step="any" min="0" {...form.register('noise', { setValueAs: num })} error={errors.noise?.message} hint="Relative to the RMS" />
        <InputField label="Samples" type="number" step="1" placeholder="default" {...form.register('samples', { setValueAs: num })} error={errors.samples?.message} hint="Snapshots; empty: the scenario’s own" />
      </div>
      {create.error && !(create.error instanceof ApiError && Object.keys(create.error.fieldErrors).length > 0) && <ErrorBanner error={create.error} title="The dataset was not generated" />}
      <div>
        <Button variant="secondary" busy={create.isPending} onClick={() => void submit()}>
          {create.isPending ? 'Generating…' : 'Generate and use this dataset'}
        </Button>
      </div>
    </div>
  );
}
