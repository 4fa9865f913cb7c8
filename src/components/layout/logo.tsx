/** The Kerfwise mark: a ring of cut kerfs around a hub, and the word. */
export function Logo({ tone = 'light' }: { tone?: 'light' | 'dark' }) {
  const text = tone === 'light' ? 'text-white' : 'text-basalt-900';
  return (
    <span className={`inline-flex items-center gap-2 text-lead font-bold tracking-wide ${text}`}>
      <svg viewBox="0 0 32 32" width="32" height="32" aria-hidden="true">
        <circle cx="16" cy="16" r="14" fill="#1d201c" />
        <circle cx="16" cy="16" r="9" fill="none" stroke="#e0660f" strokeWidth="3" strokeDasharray="5 3" />
        <circle cx="16" cy="16" r="2.5" fill="#e0660f" />
      </svg>
      Kerfwise
    </span>
  );
}
