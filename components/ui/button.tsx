import type { ButtonHTMLAttributes } from 'react';

/* Buttons and button-looking links. Every size is at least 44px tall for gloved fingers on a tablet. */

export type ButtonVariant = 'primary' | 'secondary' | 'danger' | 'quiet';

const variants: Record<ButtonVariant, string> = {
  primary: 'bg-ink-900 text-white hover:bg-ink-700 border border-ink-900',
  secondary: 'bg-white text-ink-900 hover:bg-ink-100 border border-ink-400',
  danger: 'bg-danger-700 text-white hover:bg-[#85201a] border border-danger-700',
  quiet: 'bg-transparent text-ink-800 hover:bg-ink-100 border border-transparent underline underline-offset-4',
};

export function buttonClasses(variant: ButtonVariant = 'primary', extra = ''): string {
  return [
    'inline-flex min-h-11 items-center justify-center gap-2 rounded-md px-4 py-2 text-base font-semibold',
    'transition-colors disabled:cursor-not-allowed disabled:opacity-60',
    variants[variant],
    extra,
  ].join(' ');
}

export function Button({
  variant = 'primary',
  className = '',
  type = 'button',
  ...props
}: ButtonHTMLAttributes<HTMLButtonElement> & { variant?: ButtonVariant }) {
  return <button type={type} className={buttonClasses(variant, className)} {...props} />;
}
