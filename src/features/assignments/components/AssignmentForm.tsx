import { zodResolver } from '@hookform/resolvers/zod';
import { useMemo, useState, type ReactNode } from 'react';
import { get, useForm, type FieldErrors, type Path } from 'react-hook-form';
import {
  assignmentConfig,
  centreIndices,
  edmdDictionaries,
  feedbackLabels,
  maxDictionaryFunctions,
  maxRadialCentres,
  feedbackPolicies,
  orderingLabels,
  orderings,
  toleranceConfig,
  type AssignmentConfig,
  type AssignmentConfigInput,
  type AssignmentDetail,
  type AssignmentPart,
  type CentreRule,
  type EdmdDictionary,
  type MethodConfig,
  type RankRuleConfig,
} from '../../../../shared/assignment';
import { Button } from '../../../components/Button';
import { Card } from '../../../components/Card';
import { ErrorBanner } from '../../../components/ErrorBanner';
import { Markdown } from '../../../components/Markdown';
import { ApiError } from '../../../lib/http';
import { browserTimeZone, isoToZonedWall, timeZoneNames, zonedWallToIso } from '../../../lib/timezones';
import { useAssignmentAction, useDataset, useSaveAssignment } from '../api';
import { centreRuleLabels, dictionaryLabels, kernelLabels, methodLabels } from '../labels';
import { DatasetSection } from './DatasetSection';
import { ConfirmDialog, InputField, RadioGroup, SelectField, TextAreaField } from './inputs';

type Input = AssignmentConfigInput;

/** Empty number inputs are "not given" (undefined), not NaN. */
const num = (v: unknown) => (v === '' || v === null || v === undefined ? undefined : typeof v === 'number' ? v : Number(v));

/** zod's generic messages in plain words. */
function plain(message: string | undefined): string | undefined {
  if (!message) return message;
  if (/expected number, received (undefined|NaN)/i.test(message)) return 'Enter a number';
  if (/expected number/i.test(message)) return 'Enter a number';
  if (/expected int/i.test(message)) return 'Enter a whole number';
  return message;
}

const defaultRule = (kind: RankRuleConfig['kind']): RankRuleConfig =>
  kind === 'rank' ? { kind, rank: 6 } : kind === 'energy' ? { kind, fraction: 0.999 } : kind === 'tolerance' ? { kind, tol: 1e-10 } : { kind };

const defaultMethod = (m: MethodConfig['method']): MethodConfig =>
  m === 'dmd'
    ? { method: 'dmd', rankRule: { kind: 'rank', rank: 6 } }
    : m === 'edmd'
      ? { method: 'edmd', dictionary: 'monomial', degree: 2 }
      : { method: 'kernel-edmd', kernel: 'gaussian', sigma: 1, rankRule: { kind: 'rank', rank: 10 } };

/** Switching the dictionary starts its own fields afresh (a radial dictionary has no degree, a polynomial one no centres). */
const defaultEdmd = (d: EdmdDictionary): MethodConfig =>
  d === 'radial' ? { method: 'edmd', dictionary: 'radial', sigma: 0.5, centres: { kind: 'every', step: 20 } } : { method: 'edmd', dictionary: d, degree: 2 };

const defaultCentres = (kind: CentreRule['kind']): CentreRule => (kind === 'every' ? { kind, step: 20 } : { kind, indices: [0] });

/** "0, 17, 42" → [0, 17, 42]; a token that is not a number stays NaN so the schema names its entry. */
const indexList = (v: unknown): unknown => {
  if (Array.isArray(v)) return v;
  const text = String(v ?? '').trim();
  if (text === '') return [];
  return text.split(/[\s,;]+/).filter(Boolean).map((t) => (/^[+-]?\d+(\.\d*)?([eE][+-]?\d+)?$/.test(t) ? Number(t) : NaN));
};

function nextWeekFiveOClock(tz: string): string {
  const d = new Date(Date.now() + 7 * 86400_000);
  const wall = isoToZonedWall(d.toISOString(), tz).slice(0, 10) + 'T17:00';
  return zonedWallToIso(wall, tz) ?? d.toISOString();
}

export function newAssignmentDefaults(): Input {
  const tz = browserTimeZone();
  return {
    title: '',
    statement: '',
    dueAt: nextWeekFiveOClock(tz),
    timeZone: tz,
    latePolicy: { penaltyPerDay: 10, cutoffDays: 3 },
    attempts: 3,
    feedback: 'status',
    datasetId: undefined as unknown as number,
    variants: { mode: 'per-student', noise: 0.001, jitter: 0.02 },
    method: defaultMethod('dmd'),
    dt: undefined,
    order: 'magnitude',
    top: undefined,
    domain: 'discrete',
    parts: [{ name: 'eigenvalues', kind: 'eigenvalues', weight: 10 }],
    tolerances: toleranceConfig.parse({}),
  };
}

/** Paths the form shows next to a field; the server's messages for any other path go in the banner. */
const shownPaths = [
  'title', 'statement', 'dueAt', 'timeZone', 'latePolicy.penaltyPerDay', 'latePolicy.cutoffDays', 'attempts', 'feedback', 'datasetId',
  'variants.mode', 'variants.noise', 'variants.jitter', 'method', 'method.method', 'method.rankRule', 'method.rankRule.kind', 'method.rankRule.rank',
  'method.rankRule.fraction', 'method.rankRule.tol', 'method.dictionary', 'method.degree', 'method.kernel', 'method.coef0', 'method.gamma',
  'method.sigma', 'method.centres', 'method.centres.kind', 'method.centres.step', 'method.centres.indices', 'dt', 'order', 'top', 'domain', 'parts',
  ...Object.keys(toleranceConfig.shape).map((k) => `tolerances.${k}`),
];
const isShown = (p: string) => shownPaths.includes(p) || /^parts\.\d+\.(weight|points|name|kind)$/.test(p) || /^method\.centres\.indices\.\d+$/.test(p);

const partDefs = {
  eigenvalues: { name: 'eigenvalues', weight: 10 },
  modes: { name: 'modes', weight: 5 },
  eigenfunctions: { name: 'eigenfunctions', weight: 5, points: 20 },
} as const;

function Section({ title, children, description }: { title: string; children: ReactNode; description?: ReactNode }) {
  return (
    <Card title={title}>
      {description && <p className="-mt-1 mb-3 text-sm text-muted">{description}</p>}
      <div className="flex flex-col gap-4">{children}</div>
    </Card>
  );
}

export interface AssignmentFormProps {
  courseId: number;
  /** The saved assignment (absent for a new one). */
  assignment?: AssignmentDetail;
  initial: Input;
  readOnly: boolean;
  /** After the first save of a new assignment (to move to its address). */
  onCreated?: (a: AssignmentDetail) => void;
  onPublished?: (a: AssignmentDetail) => void;
}

export function AssignmentForm({ courseId, assignment, initial, readOnly, onCreated, onPublished }: AssignmentFormProps) {
  const form = useForm<Input, unknown, AssignmentConfig>({ resolver: zodResolver(assignmentConfig), defaultValues: initial, mode: 'onTouched' });
  const { errors, isSubmitted, isDirty } = form.formState;
  const save = useSaveAssignment(courseId, assignment?.id);
  const action = useAssignmentAction(courseId);
  const [confirm, setConfirm] = useState<null | { body: AssignmentConfig }>(null);
  const [banner, setBanner] = useState<{ title: string; error: unknown; extra: [string, string][] } | null>(null);
  const [saved, setSaved] = useState<string | null>(null);
  const zones = useMemo(() => timeZoneNames(), []);

  const err = (path: string): string | undefined => {
    const e = get(errors as FieldErrors, path) as { message?: string; root?: { message?: string } } | undefined;
    if (Array.isArray(e)) {
      // A list's own errors, one per entry: name the first entry that has one.
      const i = e.findIndex((x) => x?.message);
      if (i >= 0) return `Entry ${i + 1}: ${plain((e[i] as { message: string }).message)}`;
      return plain((e as unknown as { root?: { message?: string } }).root?.message);
    }
    return plain(e?.message ?? e?.root?.message);
  };
  const reg = (path: string, numeric = false) => form.register(path as Path<Input>, numeric ? { setValueAs: num } : undefined);
  const set = (path: string, value: unknown) => form.setValue(path as Path<Input>, value as never, { shouldDirty: true, shouldValidate: isSubmitted });

  const values = form.watch();
  const method = values.method as MethodConfig;
  const rule = 'rankRule' in method ? method.rankRule : undefined;
  const dataset = useDataset(courseId, values.datasetId);
  const parts = (values.parts ?? []) as AssignmentPart[];
  const tz = values.timeZone ?? 'UTC';
  const [dueLocal, setDueLocal] = useState(() => isoToZonedWall(initial.dueAt, initial.timeZone ?? 'UTC'));
  const setDue = (local: string, zone: string) => {
    setDueLocal(local);
    set('dueAt', zonedWallToIso(local, zone) ?? '');
  };
  const published = assignment && assignment.status !== 'draft';

  const applyServerErrors = (e: unknown, title: string) => {
    const extra: [string, string][] = [];
    if (e instanceof ApiError) {
      let first = true;
      for (const [path, message] of Object.entries(e.fieldErrors)) {
        if (isShown(path)) {
          form.setError(path as Path<Input>, { type: 'server', message }, { shouldFocus: first });
          first = false;
        } else extra.push([path, message]);
      }
      if (!first && extra.length === 0) return setBanner({ title: 'The server found problems: they are shown next to their fields', error: null, extra });
    }
    setBanner({ title, error: e, extra });
  };

  const persist = async (body: AssignmentConfig) => {
    setBanner(null);
    setSaved(null);
    const a = await save.mutateAsync(body as Input);
    form.reset(initialFromDetail(a, body as Input));
    return a;
  };

  const onSave = form.handleSubmit(async (body) => {
    try {
      const a = await persist(body);
      setSaved(published ? `Saved as version ${a.version}.` : 'Draft saved.');
      if (!assignment) onCreated?.(a);
    } catch (e) {
      applyServerErrors(e, 'The assignment was not saved');
    }
  });
  const onPublishAsk = form.handleSubmit((body) => setConfirm({ body }));
  const [publishing, setPublishing] = useState(false);
  const onPublish = async () => {
    if (!confirm) return;
    setPublishing(true);
    try {
      const saved = assignment && !isDirty ? assignment : await persist(confirm.body);
      const a = await action.mutateAsync({ id: saved.id, action: 'publish' });
      setConfirm(null);
      onPublished?.(a);
    } catch (e) {
      setConfirm(null);
      applyServerErrors(e, 'The assignment was not published');
    } finally {
      setPublishing(false);
    }
  };

  const weightOf = (kind: AssignmentPart['kind']) => parts.find((p) => p.kind === kind);
  const togglePart = (kind: 'modes' | 'eigenfunctions', on: boolean) => {
    const rest = parts.filter((p) => p.kind !== kind);
    set('parts', on ? [...rest, { ...partDefs[kind], kind }] : rest);
  };
  const setPart = (kind: AssignmentPart['kind'], key: 'weight' | 'points', raw: string) => {
    set(
      'parts',
      parts.map((p) => (p.kind === kind ? { ...p, [key]: raw === '' ? undefined : Number(raw) } : p)),
    );
  };
  const partErr = (kind: AssignmentPart['kind'], key: string) => {
    const i = parts.findIndex((p) => p.kind === kind);
    return i < 0 ? undefined : err(`parts.${i}.${key}`);
  };

  return (
    <form onSubmit={(e) => void onSave(e)} noValidate className="flex flex-col gap-5" aria-label="Assignment">
      <fieldset disabled={readOnly} className="flex min-w-0 flex-col gap-5">
        <Section title="Task">
          <InputField label="Title" wide {...reg('title')} error={err('title')} />
          <div className="grid grid-cols-[minmax(0,1fr)] gap-4 lg:grid-cols-2">
            <TextAreaField
              label="Statement"
              {...reg('statement')}
              error={err('statement')}
              hint={
                <>
                  Markdown with math: <code className="font-mono">$\lambda_k$</code> inline, <code className="font-mono">$$…$$</code> on its own line. HTML is not
                  shown.
                </>
              }
            />
            <div className="flex min-w-0 flex-col gap-1">
              <span className="text-sm font-medium" id="statement-preview-label">
                Preview
              </span>
              <div aria-labelledby="statement-preview-label" role="region" className="min-h-[14rem] overflow-auto rounded-md border border-line bg-surface px-3 py-2">
                {values.statement?.trim() ? <Markdown>{values.statement}</Markdown> : <p className="text-sm text-muted">The statement as students will read it appears here.</p>}
              </div>
            </div>
          </div>
        </Section>

        <Section title="Dates and rules">
          <div className="grid grid-cols-[minmax(0,1fr)] gap-4 sm:grid-cols-2">
            <InputField
              label="Due date and time"
              type="datetime-local"
              value={dueLocal}
              onChange={(e) => setDue(e.target.value, tz)}
              error={err('dueAt')}
              hint={values.dueAt ? `Stored as ${values.dueAt}` : undefined}
              wide
            />
            <SelectField
              label="Time zone of the due date"
              {...reg('timeZone')}
              onChange={(e) => {
                void reg('timeZone').onChange(e);
                setDue(dueLocal, e.target.value);
              }}
              error={err('timeZone')}
              options={zones.map((z) => [z, z.replace(/_/g, ' ')] as const)}
              hint="Students see the date in this zone and in their own."
            />
          </div>
          <div className="grid grid-cols-2 gap-4 sm:grid-cols-3">
            <InputField label="Late penalty" type="number" step="any" min="0" max="100" suffix="% per day" {...reg('latePolicy.penaltyPerDay', true)} error={err('latePolicy.penaltyPerDay')} hint="Taken off the points for each started day late." />
            <InputField label="Hard cut-off" type="number" step="1" min="0" suffix="days" {...reg('latePolicy.cutoffDays', true)} error={err('latePolicy.cutoffDays')} hint="No hand-in later than this after the due date; 0: none late." />
            <InputField label="Attempts" type="number" step="1" min="1" {...reg('attempts', true)} error={err('attempts')} hint="How many times a student may hand in; the last counts." />
          </div>
          <RadioGroup
            legend="What a student sees before release"
            name="feedback"
            value={values.feedback ?? 'status'}
            onChange={(v) => set('feedback', v)}
            error={err('feedback')}
            options={feedbackPolicies.map((f) => ({ value: f, label: feedbackLabels[f] }))}
          />
        </Section>

        <Section title="Dataset" description="The data every variant starts from. Its shape, time step and layout are shown with a small picture once chosen.">
          <DatasetSection courseId={courseId} value={values.datasetId} onChange={(id) => set('datasetId', id)} error={err('datasetId')} readOnly={readOnly} />
        </Section>

        <Section title="Variants">
          <RadioGroup
            legend="Who gets which data"
            name="variant-mode"
            value={values.variants?.mode ?? 'per-student'}
            onChange={(v) => set('variants.mode', v)}
            error={err('variants.mode')}
            options={[
              { value: 'per-student', label: 'One variant per student', note: 'Seeded noise (and, for scenarios, jittered parameters): copied answers show.' },
              { value: 'same', label: 'The same data for everyone', note: 'Every student downloads the dataset as it is.' },
            ]}
          />
          {values.variants?.mode !== 'same' && (
            <div className="grid grid-cols-2 gap-4">
              <InputField label="Noise" type="number" step="any" min="0" max="0.5" {...reg('variants.noise', true)} error={err('variants.noise')} hint="White noise added to each variant, relative to the data’s RMS." />
              <InputField label="Parameter jitter" type="number" step="any" min="0" max="0.2" {...reg('variants.jitter', true)} error={err('variants.jitter')} hint="Scenarios only: each physical parameter moves by up to this fraction." />
            </div>
          )}
        </Section>

        <Section title="Method">
          <SelectField
            label="Method"
            value={method.method}
            onChange={(e) => {
              const m = e.target.value as MethodConfig['method'];
              set('method', defaultMethod(m));
              if (m === 'dmd' && parts.some((p) => p.kind === 'eigenfunctions')) togglePart('eigenfunctions', false);
            }}
            error={err('method') ?? err('method.method')}
            options={(['dmd', 'edmd', 'kernel-edmd'] as const).map((m) => [m, methodLabels[m]] as const)}
            className="max-w-xs"
          />
          {method.method === 'edmd' && (
            <div className="grid grid-cols-2 gap-4">
              <SelectField
                label="Dictionary"
                value={method.dictionary}
                onChange={(e) => set('method', defaultEdmd(e.target.value as EdmdDictionary))}
                error={err('method.dictionary')}
                options={edmdDictionaries.map((d) => [d, dictionaryLabels[d]] as const)}
              />
              {method.dictionary !== 'radial' ? (
                <InputField label="Degree" type="number" step="1" min="1" max="6" {...reg('method.degree', true)} error={err('method.degree')} hint="Every monomial or product of Hermite polynomials up to this total degree." />
              ) : (
                <InputField label="Width σ" type="number" step="any" min="0" {...reg('method.sigma', true)} error={err('method.sigma')} hint="Each function is exp(−‖x − c‖² / (2σ²)) around its centre c; the constant is always added." />
              )}
              {method.dictionary === 'radial' && (
                <>
                  <SelectField
                    label="Centres"
                    value={method.centres?.kind ?? 'every'}
                    onChange={(e) => set('method.centres', defaultCentres(e.target.value as CentreRule['kind']))}
                    error={err('method.centres') ?? err('method.centres.kind')}
                    options={(['every', 'indices'] as const).map((k) => [k, centreRuleLabels[k]] as const)}
                    hint="Taken from each student’s own data, so each rebuilds her centres exactly."
                  />
                  {method.centres?.kind === 'indices' ? (
                    <InputField
                      label="Snapshot indices"
                      wide
                      inputMode="numeric"
                      {...form.register('method.centres.indices' as Path<Input>, { setValueAs: indexList })}
                      error={err('method.centres.indices')}
                      hint={<CentresHint rule={method.centres} columns={xColumns(dataset.data)} />}
                    />
                  ) : (
                    <InputField
                      label="Step s"
                      type="number"
                      step="1"
                      min="1"
                      {...reg('method.centres.step', true)}
                      error={err('method.centres.step')}
                      hint={<CentresHint rule={method.centres} columns={xColumns(dataset.data)} />}
                    />
                  )}
                </>
              )}
            </div>
          )}
          {method.method === 'kernel-edmd' && (
            <div className="grid grid-cols-2 gap-4 sm:grid-cols-4">
              <SelectField label="Kernel" {...reg('method.kernel')} error={err('method.kernel')} options={(['linear', 'polynomial', 'gaussian'] as const).map((k) => [k, kernelLabels[k]] as const)} />
              {method.kernel === 'polynomial' && (
                <>
                  <InputField label="Degree" type="number" step="1" min="1" max="10" {...reg('method.degree', true)} error={err('method.degree')} hint="(γ·xᵀy + c₀)^degree" />
                  <InputField label="c₀" type="number" step="any" {...reg('method.coef0', true)} error={err('method.coef0')} hint="Empty: the engine’s default" />
                  <InputField label="γ" type="number" step="any" min="0" {...reg('method.gamma', true)} error={err('method.gamma')} hint="Empty: the engine’s default" />
                </>
              )}
              {method.kernel === 'gaussian' && <InputField label="Width σ" type="number" step="any" min="0" {...reg('method.sigma', true)} error={err('method.sigma')} hint="exp(−‖x − y‖² / (2σ²))" />}
            </div>
          )}
          {rule && (
            <div className="grid grid-cols-2 gap-4">
              <SelectField
                label="Rank"
                value={rule.kind}
                onChange={(e) => set('method.rankRule', defaultRule(e.target.value as RankRuleConfig['kind']))}
                error={err('method.rankRule') ?? err('method.rankRule.kind')}
                options={[
                  ['rank', 'a given rank'],
                  ['energy', 'by energy kept'],
                  ['tolerance', 'by relative tolerance'],
                  ...(method.method === 'dmd' ? [['optimal', 'optimal hard threshold'] as const] : []),
                ]}
              />
              {rule.kind === 'rank' && <InputField label="Rank r" type="number" step="1" min="1" {...reg('method.rankRule.rank', true)} error={err('method.rankRule.rank')} hint="Keep the r largest singular values." />}
              {rule.kind === 'energy' && <InputField label="Fraction of Σσ² kept" type="number" step="any" min="0" max="1" {...reg('method.rankRule.fraction', true)} error={err('method.rankRule.fraction')} hint="The smallest rank that keeps this share, e.g. 0.999." />}
              {rule.kind === 'tolerance' && <InputField label="Relative tolerance" type="number" step="any" min="0" {...reg('method.rankRule.tol', true)} error={err('method.rankRule.tol')} hint="Keep σᵢ above this times σ₁." />}
              {rule.kind === 'optimal' && <p className="self-end pb-2 text-xs text-muted">Gavish &amp; Donoho (2014) threshold for unknown noise; each variant may end at its own rank.</p>}
            </div>
          )}
        </Section>

        <Section title="What is graded">
          <div className="grid grid-cols-2 gap-4 sm:grid-cols-4">
            <InputField label="dt" type="number" step="any" min="0" placeholder="the dataset’s" {...reg('dt', true)} error={err('dt')} hint="Time step; empty: the dataset’s own." />
            <SelectField label="Ordering" {...reg('order')} error={err('order')} options={orderings.map((o) => [o, orderingLabels[o]] as const)} />
            <InputField label="Values graded" type="number" step="1" min="1" placeholder="all" {...reg('top', true)} error={err('top')} hint="The leading values in that order; empty: all." />
            <SelectField
              label="Domain"
              {...reg('domain')}
              error={err('domain')}
              options={[
                ['discrete', 'discrete time (λ)'],
                ['continuous', 'continuous time (log λ / dt)'],
              ]}
            />
          </div>
          <fieldset className="flex flex-col gap-2" aria-describedby="parts-error">
            <legend className="mb-1 text-sm font-medium">Parts to hand in, with their points</legend>
            <div className="flex flex-wrap items-end gap-x-3 gap-y-2 rounded-md border border-line px-3 py-2">
              <span className="min-w-[11rem] text-sm">
                <input type="checkbox" checked disabled aria-label="Eigenvalues (always)" className="mr-2 accent-accent" />
                Eigenvalues <span className="text-xs text-muted">(always)</span>
              </span>
              <InputField label="Points" type="number" step="any" min="0" value={weightOf('eigenvalues')?.weight ?? ''} onChange={(e) => setPart('eigenvalues', 'weight', e.target.value)} error={partErr('eigenvalues', 'weight')} />
            </div>
            {(['modes', 'eigenfunctions'] as const).map((kind) => {
              const p = weightOf(kind);
              const off = kind === 'eigenfunctions' && method.method === 'dmd';
              return (
                <div key={kind} className="flex flex-wrap items-end gap-x-3 gap-y-2 rounded-md border border-line px-3 py-2">
                  <label className={`min-w-[11rem] text-sm ${off ? 'text-muted' : ''}`}>
                    <input type="checkbox" checked={!!p} disabled={off} onChange={(e) => togglePart(kind, e.target.checked)} className="mr-2 accent-accent" />
                    {kind === 'modes' ? 'Modes' : 'Eigenfunction values'}
                    {off && <span className="block text-xs">Exact DMD gives modes, not eigenfunction values.</span>}
                  </label>
                  {p && <InputField label="Points" type="number" step="any" min="0" value={p.weight ?? ''} onChange={(e) => setPart(kind, 'weight', e.target.value)} error={partErr(kind, 'weight')} />}
                  {p && kind === 'eigenfunctions' && (
                    <InputField label="At how many snapshots" type="number" step="1" min="1" max="200" value={p.points ?? ''} onChange={(e) => setPart(kind, 'points', e.target.value)} error={partErr(kind, 'points')} hint="Values at the first snapshots of each student’s data." />
                  )}
                </div>
              );
            })}
            {err('parts') && (
              <p id="parts-error" className="text-xs font-medium text-danger">
                {err('parts')}
              </p>
            )}
          </fieldset>
        </Section>

        <Section title="Tolerances and credit" description="The defaults suit well-conditioned problems with light noise. Each value gets its own tolerance; the condition number widens it where the value is sensitive.">
          <div className="grid grid-cols-[minmax(0,1fr)] gap-4 sm:grid-cols-2 lg:grid-cols-3">
            <InputField label="Absolute tolerance" type="number" step="any" min="0" {...reg('tolerances.absTol', true)} error={err('tolerances.absTol')} hint="A submitted value this close to the reference always earns full credit." />
            <InputField label="Relative tolerance" type="number" step="any" min="0" {...reg('tolerances.relTol', true)} error={err('tolerances.relTol')} hint="Adds this fraction of |λ| to the tolerance, so larger values get more room." />
            <InputField label="Zero-credit multiple" type="number" step="any" min="1" {...reg('tolerances.zeroCreditMultiple', true)} error={err('tolerances.zeroCreditMultiple')} hint="Credit falls in a straight line from full at 1 tolerance to none at this many." />
            <InputField label="Cut-off multiple" type="number" step="any" min="1" {...reg('tolerances.cutoffMultiple', true)} error={err('tolerances.cutoffMultiple')} hint="Farther than this many tolerances, a value is not paired with that reference value at all." />
            <SelectField
              label="Conjugate pairs"
              {...reg('tolerances.conjugatePolicy')}
              error={err('tolerances.conjugatePolicy')}
              options={[
                ['both-required', 'both values required'],
                ['one-for-both', 'one counts for both'],
              ]}
              hint="Whether a student must list λ and its conjugate, or one of them earns both."
            />
            <InputField label="Extra-value penalty" type="number" step="any" min="0" max="1" {...reg('tolerances.extraPenalty', true)} error={err('tolerances.extraPenalty')} hint="Each surplus value costs this fraction of one value’s share; 0 lets extras go free." />
            <SelectField
              label="Unstable values"
              {...reg('tolerances.unstablePolicy')}
              error={err('tolerances.unstablePolicy')}
              options={[
                ['exclude', 'left out of grading'],
                ['spread-as-tolerance', 'graded with their spread as tolerance'],
              ]}
              hint="What happens to a reference value that moves a lot when the rank changes by one or two."
            />
            <InputField label="Unstable above spread" type="number" step="any" min="0" {...reg('tolerances.unstableSpreadLimit', true)} error={err('tolerances.unstableSpreadLimit')} hint="A value that moves farther than this across the rank band counts as unstable." />
          </div>
        </Section>
      </fieldset>

      {banner && (
        <div className="flex flex-col gap-1">
          {banner.error ? <ErrorBanner error={banner.error} title={banner.title} /> : <p className="text-sm font-medium text-danger">{banner.title}</p>}
          {banner.extra.length > 0 && (
            <ul className="ml-6 list-disc text-sm text-danger">
              {banner.extra.map(([p, m]) => (
                <li key={p}>
                  <span className="font-mono">{p}</span>: {m}
                </li>
              ))}
            </ul>
          )}
        </div>
      )}
      {isSubmitted && Object.keys(errors).length > 0 && !banner && <p className="text-sm font-medium text-danger" role="alert">Some fields need attention: they are marked above.</p>}

      {!readOnly && (
        <div className="sticky bottom-0 z-10 -mx-4 flex flex-wrap items-center gap-2 border-t border-line bg-surface/95 px-4 py-3 backdrop-blur sm:mx-0 sm:rounded-b-lg sm:px-0">
          <Button type="submit" variant={assignment?.status === 'draft' || !assignment ? 'secondary' : 'primary'} busy={save.isPending && !publishing}>
            {save.isPending && !publishing ? 'Saving…' : published ? 'Save as a new version' : 'Save draft'}
          </Button>
          {(!assignment || assignment.status === 'draft') && (
            <Button onClick={() => void onPublishAsk()} busy={publishing}>
              Publish…
            </Button>
          )}
          <span role="status" className="text-sm text-ok">
            {saved}
          </span>
          {isDirty && !saved && <span className="text-xs text-muted">Unsaved changes</span>}
        </div>
      )}
      <ConfirmDialog
        open={confirm !== null}
        title="Publish this assignment?"
        confirmLabel="Publish"
        busy={publishing}
        onConfirm={() => void onPublish()}
        onCancel={() => setConfirm(null)}
      >
        <p>
          Every enrolled student gets {confirm?.body.variants.mode === 'same' ? 'the same data' : 'a variant of their own'} and can download it at once; references are then
          computed for each. Later edits make a new version, and edits to the data or method recompute the references.
        </p>
      </ConfirmDialog>
    </form>
  );
}

/** Columns of X of a dataset (a trajectory's last snapshot is not in X). */
function xColumns(d: { snapshots: number; pairs: boolean } | undefined): number | undefined {
  return d ? (d.pairs ? d.snapshots : d.snapshots - 1) : undefined;
}

/** What the centre rule picks on the chosen dataset, before the server checks it. */
function CentresHint({ rule, columns }: { rule: CentreRule | undefined; columns: number | undefined }) {
  const base = rule?.kind === 'indices' ? '0-based columns of X, separated by commas (0 is the first snapshot).' : 'Every s-th snapshot of X from the first: columns 0, s, 2s, …';
  if (!rule || columns === undefined) return <>{base} Choose a dataset to see how many centres this makes.</>;
  const valid = rule.kind === 'every' ? Number.isInteger(rule.step) && rule.step >= 1 : Array.isArray(rule.indices) && rule.indices.every((i) => Number.isInteger(i));
  if (!valid) return <>{base}</>;
  const idx = centreIndices(rule, columns);
  const past = idx.filter((i) => i >= columns).length;
  return (
    <>
      {base} X has {columns} snapshots: {idx.length} centre{idx.length === 1 ? '' : 's'}, {idx.length + 1} functions with the constant
      {idx.length > maxRadialCentres && <> (at most {maxDictionaryFunctions})</>}
      {past > 0 && <>; {past} past the last column</>}.
    </>
  );
}

/** The form's values from a saved assignment's configuration (staff see it in full). */
export function initialFromDetail(a: AssignmentDetail, fallback?: Input): Input {
  const parsed = assignmentConfig.safeParse(a.config);
  if (parsed.success) return parsed.data;
  return fallback ?? (a.config as Input) ?? newAssignmentDefaults();
}
