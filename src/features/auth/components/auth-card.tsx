import type { ReactNode } from 'react';
import { Logo } from '../../../components/layout/logo';

export function AuthCard({ title, children }: { title: string; children: ReactNode }) {
  return (
    <main className="flex min-h-screen items-center justify-center bg-basalt-900 p-4">
      <div className="w-full max-w-md space-y-6 rounded-xl bg-white p-6 shadow-xl md:p-8">
        <Logo tone="dark" />
        <h1>{title}</h1>
        {children}
      </div>
    </main>
  );
}
