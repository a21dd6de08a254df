import type { ButtonHTMLAttributes } from 'react';

type Variant = 'primary' | 'secondary' | 'quiet' | 'subtle' | 'danger';
type Size = 'md' | 'sm';

const variants: Record<Variant, string> = {
  primary: 'bg-accent text-white border-accent hover:bg-accent-strong hover:border-accent-strong',
  secondary: 'bg-surface-raised text-ink border-line-strong hover:bg-surface-sunken',
  quiet: 'bg-transparent text-accent border-transparent hover:bg-accent-soft',
  subtle: 'bg-transparent text-muted border-transparent hover:bg-accent-soft hover:text-accent-strong',
  danger: 'bg-surface-raised text-danger border-danger/50 hover:bg-danger-soft',
};
const sizes: Record<Size, string> = {
  md: 'px-3.5 py-2 text-sm',
  sm: 'px-2.5 py-1 text-[0.8125rem]',
};

export interface ButtonProps extends ButtonHTMLAttributes<HTMLButtonElement> {
  variant?: Variant;
  size?: Size;
  busy?: boolean;
}

/** The one button. Always a real <button>; `busy` disables it and says so to screen readers. */
export function Button({ variant = 'primary', size = 'md', busy = false, className = '', type = 'button', disabled, children, ...rest }: ButtonProps) {
  return (
    <button
      type={type}
      disabled={disabled || busy}
      aria-busy={busy || undefined}
      className={`inline-flex items-center justify-center gap-1.5 rounded-md border font-medium whitespace-nowrap transition-colors disabled:cursor-not-allowed disabled:opacity-60 ${variants[variant]} ${sizes[size]} ${className}`}
      {...rest}
    >
      {children}
    </button>
  );
}
