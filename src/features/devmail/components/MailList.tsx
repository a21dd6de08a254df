import type { MailMessage } from '../../../../shared/api';
import { formatDateTime } from '../../../lib/format';

/** Caught messages, newest first; each opens to its plain text. */
export function MailList({ messages }: { messages: MailMessage[] }) {
  return (
    <ol className="flex flex-col gap-2" aria-label="Caught messages, newest first">
      {messages.map((m, i) => (
        <li key={m.id} className="rounded-lg border border-line bg-surface-raised">
          <details open={i === 0} className="group">
            <summary className="flex cursor-pointer flex-wrap items-baseline gap-x-4 gap-y-0.5 px-4 py-2.5 hover:bg-surface-sunken/40">
              <span className="min-w-0 flex-1 font-medium">{m.subject || '(no subject)'}</span>
              <span className="text-sm text-muted">to {m.to.join(', ')}</span>
              <time dateTime={m.receivedAt} className="tabular text-sm text-muted">
                {formatDateTime(m.receivedAt)}
              </time>
            </summary>
            <div className="border-t border-line px-4 py-3">
              <p className="mb-2 text-xs text-muted">From {m.from}</p>
              <pre className="font-mono text-[0.8125rem] leading-relaxed break-words whitespace-pre-wrap text-ink">{m.text}</pre>
            </div>
          </details>
        </li>
      ))}
    </ol>
  );
}
