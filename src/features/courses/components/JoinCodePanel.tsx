import { useState } from 'react';
import type { CourseDetail } from '../../../../shared/api';
import { Button } from '../../../components/Button';
import { Card } from '../../../components/Card';
import { ErrorBanner } from '../../../components/ErrorBanner';
import { useJoinCodeAction } from '../api';

/** Instructor only: the code students type to join, with copy, rotate and disable. */
export function JoinCodePanel({ course }: { course: CourseDetail }) {
  const action = useJoinCodeAction(course.id);
  const [copied, setCopied] = useState(false);
  const [confirmDisable, setConfirmDisable] = useState(false);
  const code = course.joinCode ?? null;

  const copy = async () => {
    if (!code) return;
    try {
      await navigator.clipboard.writeText(code);
      setCopied(true);
      setTimeout(() => setCopied(false), 2500);
    } catch {
      // Clipboard refused (insecure context or permission): select the text so Ctrl+C works.
      const el = document.getElementById('join-code-value');
      if (el) window.getSelection()?.selectAllChildren(el);
    }
  };

  const run = (a: 'rotate' | 'disable') => {
    setCopied(false);
    action.mutate(a, { onSuccess: () => setConfirmDisable(false) });
  };

  return (
    <Card title="Join code">
      {code ? (
        <>
          <p className="text-sm text-muted">Students enter this code on their course list to join as students.</p>
          <div className="mt-3 flex flex-wrap items-center gap-2">
            <code
              id="join-code-value"
              className="rounded-md border border-line-strong bg-surface px-3 py-1.5 font-mono text-lg tracking-wider text-ink select-all"
            >
              {code}
            </code>
            <Button variant="secondary" size="sm" onClick={copy} aria-label={`${copied ? 'Copied' : 'Copy'} join code ${code}`}>
              {copied ? '✓ Copied' : 'Copy'}
            </Button>
          </div>
          <span role="status" className="sr-only">
            {copied ? 'Join code copied to the clipboard' : ''}
          </span>
          <div className="mt-4 flex flex-wrap gap-2 border-t border-line pt-3">
            <Button variant="secondary" size="sm" busy={action.isPending && action.variables === 'rotate'} onClick={() => run('rotate')}>
              New code
            </Button>
            {confirmDisable ? (
              <span className="inline-flex flex-wrap items-center gap-2">
                <span className="text-sm text-muted">Nobody new can join until you make a new code.</span>
                <Button variant="danger" size="sm" busy={action.isPending && action.variables === 'disable'} onClick={() => run('disable')}>
                  Turn joining off
                </Button>
                <Button variant="secondary" size="sm" onClick={() => setConfirmDisable(false)}>
                  Keep it on
                </Button>
              </span>
            ) : (
              <Button variant="quiet" size="sm" onClick={() => setConfirmDisable(true)}>
                Turn joining off…
              </Button>
            )}
          </div>
          <p className="mt-2 text-xs text-muted">A new code stops the old one from working; members already in the course stay.</p>
        </>
      ) : (
        <>
          <p className="text-sm">
            <span aria-hidden="true">⊘ </span>Joining is off. Nobody new can join this course with a code.
          </p>
          <div className="mt-3">
            <Button size="sm" busy={action.isPending} onClick={() => run('rotate')}>
              Turn joining on with a new code
            </Button>
          </div>
        </>
      )}
      {action.error && (
        <div className="mt-3">
          <ErrorBanner error={action.error} title="The join code was not changed" />
        </div>
      )}
    </Card>
  );
}
