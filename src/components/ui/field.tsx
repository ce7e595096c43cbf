import { useId, type InputHTMLAttributes, type ReactNode, type SelectHTMLAttributes, type TextareaHTMLAttributes } from 'react';
import { cx } from './cx';

/** compact: a small inline control (table cells), sized by its content rather than the row */
export const inputClass = (invalid?: boolean, extra?: string, compact = false) =>
  cx(
    'block rounded border bg-paper-raised text-ink placeholder:text-ink-faint',
    compact ? 'h-8 px-2 text-sm' : 'w-full px-3 py-2 text-base',
    'focus:outline-2 focus:outline-offset-0 focus:outline-focus',
    invalid ? 'border-danger' : 'border-rule-strong',
    extra,
  );

interface FieldShellProps {
  label: ReactNode;
  hint?: ReactNode;
  error?: string;
  children: (ids: { id: string; describedBy?: string; invalid: boolean }) => ReactNode;
  className?: string;
}

/** a label, the control, a hint and the error text right under it */
export function FieldShell({ label, hint, error, children, className }: FieldShellProps) {
  const id = useId();
  const hintId = hint ? `${id}-hint` : undefined;
  const errId = error ? `${id}-err` : undefined;
  const describedBy = [hintId, errId].filter(Boolean).join(' ') || undefined;
  return (
    <div className={cx('space-y-1', className)}>
      <label htmlFor={id} className="block text-sm font-medium text-ink">
        {label}
      </label>
      {children({ id, describedBy, invalid: Boolean(error) })}
      {hint && !error && (
        <p id={hintId} className="text-sm text-ink-soft">
          {hint}
        </p>
      )}
      {error && (
        <p id={errId} className="text-sm text-danger" role="alert">
          {error}
        </p>
      )}
    </div>
  );
}

type FieldProps = InputHTMLAttributes<HTMLInputElement> & { label: ReactNode; hint?: ReactNode; error?: string; wrapperClassName?: string };

export function Field({ label, hint, error, className, wrapperClassName, ...rest }: FieldProps) {
  return (
    <FieldShell label={label} hint={hint} error={error} className={wrapperClassName}>
      {({ id, describedBy, invalid }) => (
        <input id={id} aria-describedby={describedBy} aria-invalid={invalid || undefined} className={inputClass(invalid, cx('h-11', className))} {...rest} />
      )}
    </FieldShell>
  );
}

type SelectFieldProps = SelectHTMLAttributes<HTMLSelectElement> & { label: ReactNode; hint?: ReactNode; error?: string; wrapperClassName?: string };

export function SelectField({ label, hint, error, className, wrapperClassName, children, ...rest }: SelectFieldProps) {
  return (
    <FieldShell label={label} hint={hint} error={error} className={wrapperClassName}>
      {({ id, describedBy, invalid }) => (
        <select id={id} aria-describedby={describedBy} aria-invalid={invalid || undefined} className={inputClass(invalid, cx('h-11 pr-8', className))} {...rest}>
          {children}
        </select>
      )}
    </FieldShell>
  );
}

type TextAreaFieldProps = TextareaHTMLAttributes<HTMLTextAreaElement> & { label: ReactNode; hint?: ReactNode; error?: string; wrapperClassName?: string };

export function TextAreaField({ label, hint, error, className, wrapperClassName, ...rest }: TextAreaFieldProps) {
  return (
    <FieldShell label={label} hint={hint} error={error} className={wrapperClassName}>
      {({ id, describedBy, invalid }) => (
        <textarea id={id} aria-describedby={describedBy} aria-invalid={invalid || undefined} className={inputClass(invalid, className)} {...rest} />
      )}
    </FieldShell>
  );
}

/** a form-level message (not tied to one field) */
export function FormMessage({ tone = 'danger', children }: { tone?: 'danger' | 'ok' | 'info'; children: ReactNode }) {
  const tones = {
    danger: 'border-danger/40 bg-danger-soft text-danger-ink',
    ok: 'border-ok/40 bg-ok-soft text-ok-ink',
    info: 'border-rule bg-paper-sunk text-ink',
  };
  return (
    <div role={tone === 'danger' ? 'alert' : 'status'} className={cx('rounded border px-3 py-2 text-sm', tones[tone])}>
      {children}
    </div>
  );
}
