import type { ButtonHTMLAttributes, ReactNode } from 'react';
import { Link, type LinkProps } from 'react-router';
import { cx } from './cx';
import { Spinner } from './spinner';

type Variant = 'primary' | 'secondary' | 'ghost' | 'danger';
type Size = 'sm' | 'md';

const base =
  'inline-flex items-center justify-center gap-2 rounded font-medium no-underline transition-colors disabled:cursor-not-allowed disabled:opacity-55 select-none whitespace-nowrap';
const variants: Record<Variant, string> = {
  primary: 'bg-ink text-paper hover:bg-ink-soft',
  secondary: 'bg-paper-raised text-ink border border-rule-strong hover:border-ink hover:bg-paper',
  ghost: 'text-ink hover:bg-paper-sunk',
  danger: 'bg-paper-raised text-danger border border-danger/40 hover:bg-danger-soft hover:border-danger',
};
const sizes: Record<Size, string> = {
  sm: 'h-8 px-3 text-sm',
  md: 'h-10 px-4 text-base',
};

export const buttonClass = (variant: Variant = 'primary', size: Size = 'md', extra?: string) =>
  cx(base, variants[variant], sizes[size], extra);

export interface ButtonProps extends ButtonHTMLAttributes<HTMLButtonElement> {
  variant?: Variant;
  size?: Size;
  /** shows a spinner and disables the button */
  busy?: boolean;
  children: ReactNode;
}

export function Button({ variant = 'primary', size = 'md', busy, className, children, disabled, type = 'button', ...rest }: ButtonProps) {
  return (
    <button type={type} className={buttonClass(variant, size, className)} disabled={disabled || busy} aria-busy={busy || undefined} {...rest}>
      {busy && <Spinner size="sm" label="" />}
      {children}
    </button>
  );
}

export function ButtonLink({ variant = 'secondary', size = 'md', className, ...rest }: LinkProps & { variant?: Variant; size?: Size }) {
  return <Link className={buttonClass(variant, size, className)} {...rest} />;
}
