import { useId, type InputHTMLAttributes, type ReactNode, type SelectHTMLAttributes } from 'react';

const control =
  'w-full rounded-md border border-ash-300 bg-white px-2.5 py-1.5 text-sm text-ash-900 placeholder:text-ash-400 focus:border-kiln-500 focus:outline-none focus:ring-2 focus:ring-kiln-100 aria-[invalid=true]:border-red-500';

interface FieldProps {
  label: string;
  hint?: ReactNode;
  error?: string;
}

export function TextField({ label, hint, error, className = '', ...props }: FieldProps & InputHTMLAttributes<HTMLInputElement>) {
  const id = useId();
  return (
    <div className={className}>
      <label htmlFor={id} className="mb-1 block text-xs font-medium text-ash-700">
        {label}
      </label>
      <input id={id} className={control} aria-invalid={error ? true : undefined} aria-describedby={error || hint ? `${id}-note` : undefined} {...props} />
      {(error || hint) && (
        <p id={`${id}-note`} className={`mt-1 text-xs ${error ? 'text-red-700' : 'text-ash-500'}`}>
          {error ?? hint}
        </p>
      )}
    </div>
  );
}

export function SelectField({
  label,
  hint,
  error,
  className = '',
  children,
  ...props
}: FieldProps & SelectHTMLAttributes<HTMLSelectElement>) {
  const id = useId();
  return (
    <div className={className}>
      <label htmlFor={id} className="mb-1 block text-xs font-medium text-ash-700">
        {label}
      </label>
      <select id={id} className={control} aria-invalid={error ? true : undefined} {...props}>
        {children}
      </select>
      {(error || hint) && <p className={`mt-1 text-xs ${error ? 'text-red-700' : 'text-ash-500'}`}>{error ?? hint}</p>}
    </div>
  );
}

export function CheckboxField({ label, ...props }: { label: string } & InputHTMLAttributes<HTMLInputElement>) {
  const id = useId();
  return (
    <label htmlFor={id} className="flex items-center gap-2 text-sm text-ash-800">
      <input id={id} type="checkbox" className="h-4 w-4 accent-kiln-600" {...props} />
      {label}
    </label>
  );
}
