import type { ButtonHTMLAttributes } from 'react';

type Variant = 'primary' | 'secondary' | 'danger' | 'ghost';

const variants: Record<Variant, string> = {
  primary: 'bg-ember-600 text-white hover:bg-ember-700 disabled:bg-basalt-300',
  secondary: 'bg-white text-basalt-900 border-2 border-basalt-300 hover:border-basalt-500 disabled:text-basalt-400',
  danger: 'bg-alarm-500 text-white hover:bg-alarm-700 disabled:bg-basalt-300',
  ghost: 'bg-transparent text-basalt-800 hover:bg-basalt-100',
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
      className={`inline-flex min-h-touch min-w-touch items-center justify-center gap-2 rounded-md px-4 font-semibold transition-colors disabled:cursor-not-allowed ${variants[variant]} ${className}`}
      {...props}
    />
  );
}
