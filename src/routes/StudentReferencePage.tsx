import { Link, useParams } from 'react-router-dom';
import { toleranceConfig, type AssignmentConfig } from '../../shared/assignment';
import { Card } from '../components/Card';
import { ErrorBanner } from '../components/ErrorBanner';
import { Loading } from '../components/Loading';
import { useAssignment, useStudentReference } from '../features/assignments/api';
import { ReferencePictures } from '../features/assignments/components/ReferencePictures';
import { PageHeader } from './PageHeader';

/** Staff: one student's reference spectrum, pictures first. */
export function StudentReferencePage() {
  const { courseId, assignmentId, studentId } = useParams();
  const cid = Number(courseId);
  const aid = Number(assignmentId);
  const sid = Number(studentId);
  const assignment = useAssignment(cid, aid);
  const ref = useStudentReference(cid, aid, sid);
  const title = assignment.data?.title ?? 'Assignment';
  const eyebrow = (
    <Link to={`/courses/${cid}/assignments/${aid}`} className="hover:text-accent hover:underline">
      ← {title}
    </Link>
  );
  if (ref.isPending || assignment.isPending) return <Loading what="the reference" />;
  if (ref.error) return <><PageHeader title="Reference" eyebrow={eyebrow} /><ErrorBanner error={ref.error} title="The reference could not be loaded" /></>;
  const r = ref.data;
  const config = assignment.data?.config as AssignmentConfig | undefined;
  const limit = config?.tolerances?.unstableSpreadLimit ?? toleranceConfig.parse({}).unstableSpreadLimit;
  const who = r.student?.displayName ?? 'Student';
  return (
    <>
      <PageHeader title={`Reference of ${who}`} eyebrow={eyebrow}>
        variant {r.variantId} · version {r.version} · {r.status === 'ready' ? 'ready' : r.status === 'failed' ? 'failed' : 'being computed…'}
      </PageHeader>
      {r.status === 'failed' && <ErrorBanner error={new Error(r.message ?? 'No message was stored.')} title="Computing this reference failed" />}
      {r.reference ? (
        <Card>
          <ReferencePictures data={r} unstableSpreadLimit={limit} title={`Reference of ${who}`} />
        </Card>
      ) : (
        r.status !== 'failed' && <p className="text-sm text-muted">The reference is {r.status === 'queued' ? 'waiting in the queue' : 'being computed'}; this page updates by itself.</p>
      )}
    </>
  );
}
