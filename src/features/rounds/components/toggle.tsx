import type { ReactNode } from 'react';
import { DoneMark } from './marks';

/** A large on/off button: pressed shows dark with a tick, so the state does not rest on colour. */
export function Toggle({
  pressed,
  onToggle,
  children,
  className = '',
}: {
  pressed: boolean;
  onToggle: () => void;
  children: ReactNode;
  className?: string;
}) {
  return (
    <button
      type="button"
      aria-pressed={pressed}
      onClick={onToggle}
      className={`flex min-h-14 w-full items-center gap-3 rounded-md border-2 px-3 text-left font-semibold leading-tight disabled:opacity-60 ${pressed ? 'border-basalt-900 bg-basalt-900 text-white' : 'border-basalt-400 bg-white text-basalt-900 hover:border-basalt-700'} ${className}`}
    >
      <span
        aria-hidden="true"
        className={`inline-flex h-6 w-6 shrink-0 items-center justify-center rounded border-2 ${pressed ? 'border-white bg-white text-basalt-900' : 'border-basalt-500'}`}
      >
        {pressed && <DoneMark />}
      </span>
      <span>{children}</span>
    </button>
  );
}
