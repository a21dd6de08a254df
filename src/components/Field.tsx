import { useId, type ComponentPropsWithRef } from 'react';

export interface FieldProps extends Omit<ComponentPropsWithRef<'input'>, 'id'> {
  label: string;
  hint?: string;
  error?: string;
  inputClassName?: string;
}

/**
 * A labelled text input with an optional hint and error, wired up with aria-describedby.
 * Spread react-hook-form's `register(name)` into it: the ref reaches the input, so the
 * form can focus the first field in error.
 */
export function Field({ label, hint, error, className = '', inputClassName = '', ...input }: FieldProps) {
  const id = useId();
  const hintId = hint ? `${id}-hint` : undefined;
  const errorId = error ? `${id}-error` : undefined;
  return (
    <div className={`flex flex-col gap-1 ${className}`}>
      <label htmlFor={id} className="text-sm font-medium text-ink">
        {label}
      </label>
      <input
        id={id}
        aria-invalid={error ? true : undefined}
        aria-describedby={[hintId, errorId].filter(Boolean).join(' ') || undefined}
        className={`rounded-md border bg-surface-raised px-3 py-2 text-sm text-ink placeholder:text-muted/70 ${
          error ? 'border-danger' : 'border-line-strong'
        } ${inputClassName}`}
        {...input}
      />
      {hint && (
        <p id={hintId} className="text-xs text-muted">
          {hint}
        </p>
      )}
      {error && (
        <p id={errorId} className="text-xs font-medium text-danger">
          {error}
        </p>
      )}
    </div>
  );
}
