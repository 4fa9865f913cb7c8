import type { ReactNode } from 'react';

const tones = {
  error: 'border-alarm-500 bg-alarm-100 text-alarm-700',
  info: 'border-basalt-400 bg-white text-basalt-800',
  success: 'border-moss-500 bg-moss-100 text-moss-700',
  caution: 'border-caution-500 bg-caution-100 text-caution-700',
};

export function Alert({ tone = 'info', title, children }: { tone?: keyof typeof tones; title?: string; children?: ReactNode }) {
  return (
    <div role={tone === 'error' ? 'alert' : 'status'} className={`rounded-md border-l-8 px-4 py-3 ${tones[tone]}`}>
      {title && <p className="font-semibold">{title}</p>}
      {children && <div>{children}</div>}
    </div>
  );
}
