import type { ButtonHTMLAttributes } from 'react';

type Variant = 'primary' | 'secondary' | 'quiet' | 'danger';

const styles: Record<Variant, string> = {
  primary: 'bg-matrix-700 text-white hover:bg-matrix-800 disabled:bg-matrix-300',
  secondary: 'border border-matrix-300 bg-paper-raised text-matrix-800 hover:bg-matrix-50 disabled:text-ink-faint',
  quiet: 'text-matrix-700 hover:bg-matrix-50 disabled:text-ink-faint',
  danger: 'bg-below text-white hover:brightness-110 disabled:opacity-50',
};

export function Button({
  variant = 'primary',
  className = '',
  type = 'button',
  ...props
}: ButtonHTMLAttributes<HTMLButtonElement> & { variant?: Variant }) {
  return (
    <button
      type={type}
      className={`inline-flex items-center justify-center gap-2 rounded-md px-3.5 py-1.5 text-sm font-medium transition-colors disabled:cursor-not-allowed ${styles[variant]} ${className}`}
      {...props}
    />
  );
}
