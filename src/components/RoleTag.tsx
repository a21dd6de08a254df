import { roleLabels, type Role } from '../../shared/api';

const styles: Record<Role, string> = {
  instructor: 'border-accent/40 bg-accent-soft text-accent-strong',
  teaching_assistant: 'border-focus/30 bg-[#e2eef1] text-[#16505f]',
  student: 'border-line-strong bg-surface-sunken text-ink',
};

/** The role as a word, lightly tinted. */
export function RoleTag({ role }: { role: Role }) {
  return (
    <span className={`inline-block rounded border px-1.5 py-px text-xs font-medium whitespace-nowrap ${styles[role]}`}>{roleLabels[role]}</span>
  );
}
