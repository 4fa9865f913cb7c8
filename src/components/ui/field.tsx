import { forwardRef, useId, type InputHTMLAttributes, type ReactNode, type SelectHTMLAttributes } from 'react';

const control =
  'block w-full min-h-touch rounded-md border-2 border-basalt-300 bg-white px-3 text-body text-basalt-900 focus:border-ember-500 aria-[invalid=true]:border-alarm-500';

interface FieldProps {
  label: string;
  error?: string;
  hint?: ReactNode;
}

export const TextField = forwardRef<HTMLInputElement, InputHTMLAttributes<HTMLInputElement> & FieldProps>(function TextField(
  { label, error, hint, id, ...props },
  ref,
) {
  const autoId = useId();
  const inputId = id ?? autoId;
  return (
    <div className="space-y-1">
      <label htmlFor={inputId} className="block font-semibold">
        {label}
      </label>
      <input
        ref={ref}
        id={inputId}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${inputId}-error` : undefined}
        className={control}
        {...props}
      />
      {hint && !error && <p className="text-caption text-basalt-600">{hint}</p>}
      {error && (
        <p id={`${inputId}-error`} className="text-caption font-semibold text-alarm-700">
          {error}
        </p>
      )}
    </div>
  );
});

export const SelectField = forwardRef<HTMLSelectElement, SelectHTMLAttributes<HTMLSelectElement> & FieldProps>(function SelectField(
  { label, error, hint, id, children, ...props },
  ref,
) {
  const autoId = useId();
  const selectId = id ?? autoId;
  return (
    <div className="space-y-1">
      <label htmlFor={selectId} className="block font-semibold">
        {label}
      </label>
      <select ref={ref} id={selectId} aria-invalid={error ? true : undefined} className={control} {...props}>
        {children}
      </select>
      {hint && !error && <p className="text-caption text-basalt-600">{hint}</p>}
      {error && <p className="text-caption font-semibold text-alarm-700">{error}</p>}
    </div>
  );
});
