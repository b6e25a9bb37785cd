import type { ButtonHTMLAttributes } from 'react';

type Variant = 'primary' | 'secondary' | 'ghost' | 'danger';

const variants: Record<Variant, string> = {
  primary: 'bg-kiln-600 text-white hover:bg-kiln-700 disabled:bg-kiln-200',
  secondary: 'bg-white text-ash-800 border border-ash-300 hover:bg-ash-100 disabled:text-ash-400',
  ghost: 'text-ash-700 hover:bg-ash-100 disabled:text-ash-400',
  danger: 'bg-white text-red-700 border border-red-300 hover:bg-red-50 disabled:text-red-300',
};

export function Button({
  variant = 'secondary',
  size = 'md',
  className = '',
  type = 'button',
  ...props
}: ButtonHTMLAttributes<HTMLButtonElement> & { variant?: Variant; size?: 'sm' | 'md' }) {
  const pad = size === 'sm' ? 'px-2 py-1 text-xs' : 'px-3 py-1.5 text-sm';
  return (
    <button
      type={type}
      className={`inline-flex items-center justify-center gap-1.5 rounded-md font-medium transition-colors disabled:cursor-not-allowed ${pad} ${variants[variant]} ${className}`}
      {...props}
    />
  );
}
