import type { ButtonHTMLAttributes } from 'react';

type Variant = 'primary' | 'secondary' | 'quiet' | 'danger';

const styles: Record<Variant, string> = {
  primary: 'bg-tide-700 text-white hover:bg-tide-800 disabled:bg-slate-400',
  secondary:
    'border border-tide-600 bg-white text-tide-800 hover:bg-tide-50 disabled:border-slate-300 disabled:text-slate-400',
  quiet: 'text-tide-700 underline-offset-2 hover:underline disabled:text-slate-400',
  danger: 'border border-red-300 bg-white text-red-800 hover:bg-red-50 disabled:text-slate-400',
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
      className={`inline-flex items-center gap-1 rounded px-3 py-1.5 text-sm font-medium focus:outline-none focus-visible:ring-2 focus-visible:ring-tide-600 focus-visible:ring-offset-1 disabled:cursor-not-allowed ${styles[variant]} ${className}`}
      {...props}
    />
  );
}
