import { Link } from 'react-router-dom';
import type { SeparationResult, TaskWarning } from '../../../../shared/assignment';
import { ErrorBanner } from '../../../components/ErrorBanner';
import { Loading } from '../../../components/Loading';
import { Table, Td, Th } from '../../../components/Table';
import { formatSci } from '../../../lib/numbers';
import { usePreview, useVariants } from '../api';
import { ReferencePictures } from './ReferencePictures';

const warningTitles: Record<TaskWarning['code'], string> = {
  'dictionary-rank-deficient': 'The dictionary is rank-deficient on this data',
  'undetermined-values': 'Some values are undetermined',
  'unstable-values': 'Some values are unstable',
  'rank-too-high': 'The rank is above what some data allows',
  separation: 'Variants are hard to tell apart',
  'reference-failed': 'The reference could not be computed',
};

export function TaskWarnings({ warnings, pending = false }: { warnings: TaskWarning[]; pending?: boolean }) {
  if (warnings.length === 0 && pending) return <p className="text-sm text-muted">Checked when the preview reference is ready.</p>;
  if (warnings.length === 0)
    return (
      <p className="flex items-center gap-2 text-sm text-ok">
        <span aria-hidden="true">✓</span> Nothing makes this task ill-posed on the uploaded data.
      </p>
    );
  return (
    <ul className="flex flex-col gap-2" aria-label="Warnings">
      {warnings.map((w, i) => (
        <li key={i} className="rounded-md border border-near-miss/50 bg-[#fbeedd] px-3 py-2 text-sm">
          <p className="font-semibold">
            <span aria-hidden="true" className="mr-1.5 text-near-miss">
              ▲
            </span>
            {warningTitles[w.code]}
          </p>
          <p className="mt-0.5">{w.message}</p>
        </li>
      ))}
    </ul>
  );
}

export function SeparationNote({ s }: { s: SeparationResult | null }) {
  if (!s) return <p className="text-sm text-muted">Variant separation is checked at publishing, when every student has a variant.</p>;
  return (
    <div className="text-sm">
      {s.smallest === null ? (
        <p className="text-muted">
          {s.variants < 2 ? 'Fewer than two variants: there is nothing to compare yet.' : 'Not computed yet.'}
        </p>
      ) : (
        <p>
          Across <span className="tabular">{s.variants}</span> variants, the closest two ({s.pair?.join(' and ') ?? 'a pair'}) differ by{' '}
          <span className="tabular font-medium">{formatSci(s.smallest)}</span> tolerances in their graded eigenvalues.{' '}
          {!s.warning && 'Copied work would show.'}
        </p>
      )}
      {s.warning && (
        <p className="mt-1.5 rounded-md border border-near-miss/50 bg-[#fbeedd] px-3 py-2">
          <span aria-hidden="true" className="mr-1.5 text-near-miss">
            ▲
          </span>
          {s.warning}
        </p>
      )}
    </div>
  );
}

/** The instructor's preview: the reference on the data as uploaded, what makes the task ill-posed, variant separation. */
export function PreviewPanel({ courseId, assignmentId, unstableSpreadLimit, title }: { courseId: number; assignmentId: number; unstableSpreadLimit: number; title: string }) {
  const preview = usePreview(courseId, assignmentId);
  if (preview.isPending) return <Loading what="the preview (the reference on the dataset as uploaded)" />;
  if (preview.error) return <ErrorBanner error={preview.error} title="The preview could not be computed" />;
  const { reference, warnings, separation } = preview.data;
  return (
    <div className="flex flex-col gap-5">
      <section aria-labelledby="warnings-heading">
        <h3 id="warnings-heading" className="mb-2 text-sm font-semibold">
          Is the task well-posed?
        </h3>
        <TaskWarnings warnings={warnings.filter((w) => w.code !== 'separation' || !separation?.warning)} pending={reference?.status !== 'ready' && reference?.status !== 'failed'} />
      </section>
      {reference?.reference ? (
        <ReferencePictures data={reference} unstableSpreadLimit={unstableSpreadLimit} title={`${title}, reference on the dataset as uploaded`} />
      ) : reference ? (
        <p className="text-sm text-muted">
          The preview reference is {reference.status}
          {reference.message ? `: ${reference.message}` : '.'}
        </p>
      ) : (
        <p className="text-sm text-muted">No preview reference yet.</p>
      )}
      <section aria-labelledby="separation-heading">
        <h3 id="separation-heading" className="mb-2 text-sm font-semibold">
          Variant separation
        </h3>
        <SeparationNote s={separation} />
      </section>
    </div>
  );
}

const statusWord = { queued: 'queued', running: 'computing', ready: 'ready', failed: 'failed' } as const;

/** One row per student: seed, checksum, reference state, and a link to that student's reference. */
export function VariantsTable({ courseId, assignmentId }: { courseId: number; assignmentId: number }) {
  const variants = useVariants(courseId, assignmentId);
  if (variants.isPending) return <Loading what="variants" />;
  if (variants.error) return <ErrorBanner error={variants.error} title="The variants could not be loaded" />;
  if (variants.data.length === 0) return <p className="text-sm text-muted">No variants yet. They are made for every enrolled student when the assignment is published, and for each student who joins later.</p>;
  return (
    <Table caption={`Variants (${variants.data.length})`} captionHidden>
      <thead>
        <tr>
          <Th>Student</Th>
          <Th numeric>Seed</Th>
          <Th>Checksum</Th>
          <Th>Reference</Th>
          <Th>
            <span className="sr-only">Actions</span>
          </Th>
        </tr>
      </thead>
      <tbody>
        {variants.data.map((v) => (
          <tr key={v.variantId}>
            <Td>{v.student?.displayName ?? <span className="text-muted">everyone (same data)</span>}</Td>
            <Td numeric className="font-mono text-[0.8125rem]">
              {v.seed}
            </Td>
            <Td className="font-mono text-[0.8125rem]" title={v.checksum ?? undefined}>
              {v.checksum ? `${v.checksum.slice(0, 10)}…` : '—'}
            </Td>
            <Td className="text-[0.8125rem]">
              {v.referenceStatus ? (
                <span className={v.referenceStatus === 'failed' ? 'font-medium text-danger' : v.referenceStatus === 'ready' ? 'text-ok' : 'text-muted'}>
                  {v.referenceStatus === 'ready' ? '✓ ' : v.referenceStatus === 'failed' ? '✕ ' : '… '}
                  {statusWord[v.referenceStatus]}
                </span>
              ) : (
                '—'
              )}
            </Td>
            <Td className="text-right text-[0.8125rem]">
              {v.student && (
                <Link to={`/courses/${courseId}/assignments/${assignmentId}/reference/${v.student.id}`} className="text-accent underline">
                  Reference of {v.student.displayName.split(' ')[0]}
                </Link>
              )}
            </Td>
          </tr>
        ))}
      </tbody>
    </Table>
  );
}
