import { useState } from 'react';
import { orderingLabels, type AssignmentDetail, type Task } from '../../../../shared/assignment';
import { Button } from '../../../components/Button';
import { dictionaryLabels, domainLabels, kernelLabels, methodLabels, partLabels } from '../labels';

function CopyBlock({ text, label }: { text: string; label: string }) {
  const [copied, setCopied] = useState(false);
  return (
    <div className="relative">
      <div className="mb-1 flex items-center justify-between gap-2">
        <span className="text-xs font-medium text-muted">{label}</span>
        <Button
          size="sm"
          variant="secondary"
          aria-label={`Copy ${label}`}
          onClick={() =>
            void navigator.clipboard?.writeText(text).then(() => {
              setCopied(true);
              window.setTimeout(() => setCopied(false), 1500);
            })
          }
        >
          {copied ? 'Copied' : 'Copy'}
        </Button>
      </div>
      <pre className="overflow-x-auto rounded-md border border-line bg-surface-sunken px-3 py-2 font-mono text-xs leading-relaxed text-ink">{text}</pre>
    </div>
  );
}

const capitalise = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);

/** Exactly what to compute, in words and as a machine-readable block (the spectrum CLI's options and the JSON). */
export function TaskDescription({ task, dataset }: { task: Task; dataset: AssignmentDetail['dataset'] }) {
  const rows: [string, React.ReactNode][] = [
    ['Method', methodLabels[task.method]],
    [
      'Rank',
      <>
        {task.rank ?? 'decided when your variant is made'}
        {task.rankRule && <span className="text-muted"> ({task.rankRule})</span>}
      </>,
    ],
  ];
  if (task.dictionary === 'radial') {
    rows.push([
      'Dictionary',
      <>
        {dictionaryLabels.radial}: the constant 1 and exp(−‖x − c‖² / (2σ²)) for each centre c, with σ = {task.sigma}
      </>,
    ]);
    if (task.centres) {
      const idx = task.centres.indices;
      rows.push([
        'Centres',
        <>
          {capitalise(task.centres.description)}, taken from your own data{dataset.pairs ? '' : ' (one trajectory: X is your data without its last snapshot)'}.
          {idx && (
            <>
              {' '}
              In dictionary order, the columns of X (0-based: NumPy <span className="font-mono text-[0.8125rem]">X[:, i]</span>; MATLAB and Julia{' '}
              <span className="font-mono text-[0.8125rem]">X(:, i+1)</span>):
              <span className="mt-1 block max-h-24 overflow-y-auto rounded border border-line bg-surface-sunken px-2 py-1 font-mono text-xs break-words">{idx.join(', ')}</span>
            </>
          )}
        </>,
      ]);
    }
  } else if (task.dictionary) rows.push(['Dictionary', `${dictionaryLabels[task.dictionary]}${task.degree !== undefined ? `, total degree up to ${task.degree}` : ''}`]);
  if (task.kernel) {
    const p: string[] = [kernelLabels[task.kernel]];
    if (task.degree !== undefined) p.push(`degree ${task.degree}`);
    if (task.coef0 !== undefined) p.push(`c₀ = ${task.coef0}`);
    if (task.gamma !== undefined) p.push(`γ = ${task.gamma}`);
    if (task.sigma !== undefined) p.push(`σ = ${task.sigma}`);
    rows.push(['Kernel', p.join(', ')]);
  }
  rows.push(['Time step dt', task.dt !== undefined ? String(task.dt) : dataset.dt !== null ? String(dataset.dt) : 'not given (discrete time only)']);
  rows.push(['Ordering', orderingLabels[task.order]]);
  rows.push(['Values graded', task.top !== undefined ? `the first ${task.top} in that order (a conjugate pair is never split)` : 'all of them']);
  rows.push(['Domain', domainLabels[task.domain]]);
  rows.push([
    'Your data',
    <>
      {dataset.n} states × {dataset.snapshots} snapshots{dataset.pairs ? ', given as explicit pairs (X and Y)' : ', one trajectory'}; one snapshot per{' '}
      {dataset.layout === 'columns' ? 'column' : 'row'}
    </>,
  ]);
  // One key per line, each value compact: short enough to read, still plain JSON.
  const entries = Object.entries(task).filter(([k]) => k !== 'cli');
  const json = `{\n${entries.map(([k, v]) => `  ${JSON.stringify(k)}: ${JSON.stringify(v)}`).join(',\n')}\n}`;
  return (
    <div className="flex flex-col gap-4">
      <dl className="grid grid-cols-[minmax(7rem,max-content)_1fr] gap-x-5 gap-y-1.5 text-sm">
        {rows.map(([k, v]) => (
          <div key={k} className="contents">
            <dt className="text-muted">{k}</dt>
            <dd>{v}</dd>
          </div>
        ))}
      </dl>
      <div>
        <p className="mb-1 text-sm font-medium">Parts to hand in</p>
        <ul className="flex flex-col gap-1 text-sm">
          {task.parts.map((p) => (
            <li key={p.name} className="flex flex-wrap gap-x-2">
              <span className="font-mono text-[0.8125rem]">{p.name}</span>
              <span>
                {partLabels[p.kind]}
                {p.kind === 'eigenfunctions' && p.points !== undefined && ` at the first ${p.points} snapshots of your data`}
              </span>
              <span className="tabular text-muted">
                · {p.weight} point{p.weight === 1 ? '' : 's'}
              </span>
            </li>
          ))}
        </ul>
      </div>
      <CopyBlock label="As spectrum command-line options" text={task.cli} />
      <CopyBlock label="As JSON" text={json} />
    </div>
  );
}

/** What to hand in and in which formats, with a short example of each, in our own words. */
export function HandInFormats({ task }: { task: Task }) {
  const hasVectors = task.parts.some((p) => p.kind !== 'eigenvalues');
  return (
    <div className="flex flex-col gap-3 text-sm">
      <p>
        Hand in the eigenvalues{hasVectors ? ' (and the vectors the parts above ask for, in the same order as your eigenvalues)' : ''} in any one of these
        formats. Order does not matter for the eigenvalues: each of yours is paired with the closest reference value.
      </p>
      <div className="grid grid-cols-[minmax(0,1fr)] gap-3 md:grid-cols-3">
        <FormatExample title="CSV with columns re,im" text={'re,im\n0.98123,0.18567\n0.98123,-0.18567\n0.61004,0\n'} note="One value per line, a header line first." />
        <FormatExample title="JSON list of [re, im] pairs" text={'[[0.98123, 0.18567],\n [0.98123, -0.18567],\n [0.61004, 0]]'} note="A plain list; 0 for the imaginary part of a real value." />
        <FormatExample title="NumPy-printed complex array" text={'[0.98123+0.18567j 0.98123-0.18567j\n 0.61004+0.j     ]'} note="What print(np.linalg.eigvals(A)) shows, pasted as text." />
      </div>
    </div>
  );
}

function FormatExample({ title, text, note }: { title: string; text: string; note: string }) {
  return (
    <figure className="min-w-0 rounded-md border border-line bg-surface-raised p-2.5">
      <figcaption className="mb-1 text-xs font-semibold">{title}</figcaption>
      <pre className="overflow-x-auto rounded bg-surface-sunken px-2 py-1.5 font-mono text-xs">{text}</pre>
      <p className="mt-1 text-xs text-muted">{note}</p>
    </figure>
  );
}
