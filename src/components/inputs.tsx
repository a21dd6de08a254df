import { useEffect, useId, useRef, type ComponentPropsWithRef, type ReactNode } from 'react';
import { Button } from './Button';

const control = (error?: string) =>
  `rounded-md border bg-surface-raised px-2.5 py-1.5 text-sm text-ink disabled:bg-surface-sunken/60 disabled:text-muted ${error ? 'border-danger' : 'border-line-strong'}`;

function Described({ id, hint, error }: { id: string; hint?: ReactNode; error?: string }) {
  return (
    <>
      {hint && (
        <p id={`${id}-hint`} className="text-xs text-muted">
          {hint}
        </p>
      )}
      {error && (
        <p id={`${id}-error`} className="text-xs font-medium text-danger">
          {error}
        </p>
      )}
    </>
  );
}

const describedBy = (id: string, hint?: ReactNode, error?: string) => [hint ? `${id}-hint` : '', error ? `${id}-error` : ''].filter(Boolean).join(' ') || undefined;

type InputProps = Omit<ComponentPropsWithRef<'input'>, 'id'> & { label: ReactNode; hint?: ReactNode; error?: string; suffix?: ReactNode; wide?: boolean };

/** A labelled input (number or text) with a plain sentence under it and its error. */
export function InputField({ label, hint, error, suffix, className = '', wide = false, ...input }: InputProps) {
  const id = useId();
  return (
    <div className={`flex min-w-0 flex-col gap-1 ${className}`}>
      <label htmlFor={id} className="text-sm font-medium text-ink">
        {label}
      </label>
      <span className="flex items-center gap-1.5">
        <input id={id} aria-invalid={error ? true : undefined} aria-describedby={describedBy(id, hint, error)} className={`${control(error)} ${wide ? 'w-full' : 'w-full max-w-[11rem]'} tabular`} {...input} />
        {suffix && <span className="text-sm text-muted">{suffix}</span>}
      </span>
      <Described id={id} hint={hint} error={error} />
    </div>
  );
}

type SelectProps = Omit<ComponentPropsWithRef<'select'>, 'id'> & { label: ReactNode; hint?: ReactNode; error?: string; options: readonly (readonly [string, string])[] };

export function SelectField({ label, hint, error, options, className = '', ...select }: SelectProps) {
  const id = useId();
  return (
    <div className={`flex min-w-0 flex-col gap-1 ${className}`}>
      <label htmlFor={id} className="text-sm font-medium text-ink">
        {label}
      </label>
      <select id={id} aria-invalid={error ? true : undefined} aria-describedby={describedBy(id, hint, error)} className={`${control(error)} w-full max-w-full`} {...select}>
        {options.map(([v, l]) => (
          <option key={v} value={v}>
            {l}
          </option>
        ))}
      </select>
      <Described id={id} hint={hint} error={error} />
    </div>
  );
}

type AreaProps = Omit<ComponentPropsWithRef<'textarea'>, 'id'> & { label: ReactNode; hint?: ReactNode; error?: string };

export function TextAreaField({ label, hint, error, className = '', ...area }: AreaProps) {
  const id = useId();
  return (
    <div className={`flex min-w-0 flex-col gap-1 ${className}`}>
      <label htmlFor={id} className="text-sm font-medium text-ink">
        {label}
      </label>
      <textarea id={id} aria-invalid={error ? true : undefined} aria-describedby={describedBy(id, hint, error)} className={`${control(error)} min-h-[14rem] w-full font-mono text-[0.8125rem] leading-relaxed`} {...area} />
      <Described id={id} hint={hint} error={error} />
    </div>
  );
}

/** Radio choices as a fieldset with a legend. */
export function RadioGroup<T extends string>({
  legend,
  name,
  value,
  onChange,
  options,
  hint,
  error,
  disabled,
}: {
  legend: string;
  name: string;
  value: T;
  onChange: (v: T) => void;
  options: readonly { value: T; label: ReactNode; note?: ReactNode; disabled?: boolean }[];
  hint?: ReactNode;
  error?: string;
  disabled?: boolean;
}) {
  const id = useId();
  return (
    <fieldset className="flex min-w-0 flex-col gap-1.5" aria-describedby={describedBy(id, hint, error)} disabled={disabled}>
      <legend className="mb-1 text-sm font-medium text-ink">{legend}</legend>
      {options.map((o) => (
        <label key={o.value} className={`flex items-start gap-2 text-sm ${o.disabled ? 'text-muted' : ''}`}>
          <input type="radio" name={name} value={o.value} checked={value === o.value} disabled={o.disabled} onChange={() => onChange(o.value)} className="mt-1 accent-accent" />
          <span>
            {o.label}
            {o.note && <span className="block text-xs text-muted">{o.note}</span>}
          </span>
        </label>
      ))}
      <Described id={id} hint={hint} error={error} />
    </fieldset>
  );
}

/** A modal question with a confirm and a cancel button (the native <dialog>: focus is trapped and Escape cancels). */
export function ConfirmDialog({
  open,
  title,
  children,
  confirmLabel,
  onConfirm,
  onCancel,
  busy,
}: {
  open: boolean;
  title: string;
  children: ReactNode;
  confirmLabel: string;
  onConfirm: () => void;
  onCancel: () => void;
  busy?: boolean;
}) {
  const ref = useRef<HTMLDialogElement>(null);
  const titleId = useId();
  useEffect(() => {
    const d = ref.current;
    if (!d) return;
    if (open && !d.open) d.showModal();
    if (!open && d.open) d.close();
  }, [open]);
  return (
    <dialog
      ref={ref}
      aria-labelledby={titleId}
      onCancel={(e) => {
        e.preventDefault();
        onCancel();
      }}
      className="m-auto w-[min(32rem,calc(100vw-2rem))] rounded-lg border border-line bg-surface-raised p-5 text-ink shadow-xl backdrop:bg-ink/30"
    >
      <h2 id={titleId} className="text-base font-semibold">
        {title}
      </h2>
      <div className="mt-2 text-sm">{children}</div>
      <div className="mt-4 flex justify-end gap-2">
        <Button variant="secondary" onClick={onCancel}>
          Cancel
        </Button>
        <Button busy={busy} onClick={onConfirm}>
          {confirmLabel}
        </Button>
      </div>
    </dialog>
  );
}
