/**
 * Kerfwise's marks for the state of a position in a round. Each state has a shape as well as a
 * colour, so it reads in bad light and for colour-blind people; the legend names them.
 */
import type { ReactNode } from 'react';

function Svg({ children, className = 'h-4 w-4' }: { children: ReactNode; className?: string }) {
  return (
    <svg
      viewBox="0 0 16 16"
      aria-hidden="true"
      className={className}
      fill="none"
      stroke="currentColor"
      strokeWidth={2.2}
      strokeLinecap="round"
      strokeLinejoin="round"
    >
      {children}
    </svg>
  );
}

export const DoneMark = ({ className }: { className?: string }) => (
  <Svg className={className}>
    <path d="M2.5 8.5l3.5 3.5 7.5-8" />
  </Svg>
);
export const WaitingMark = ({ className }: { className?: string }) => (
  <Svg className={className}>
    <circle cx="8" cy="8" r="6" />
    <path d="M8 4.5V8l2.5 1.8" />
  </Svg>
);
export const DraftMark = ({ className }: { className?: string }) => (
  <Svg className={className}>
    <path d="M3 13l1-3.5 7-7 2.5 2.5-7 7z" />
  </Svg>
);
export const RefusedMark = ({ className }: { className?: string }) => (
  <Svg className={className}>
    <path d="M8 2.5v7" />
    <path d="M8 13.2v.3" />
  </Svg>
);
export const OverLimitMark = ({ className }: { className?: string }) => (
  <Svg className={className}>
    <path d="M8 2.5L14 13H2z" fill="currentColor" strokeWidth={1.5} />
  </Svg>
);
export const ChangeMark = ({ className }: { className?: string }) => (
  <Svg className={className}>
    <path d="M2.5 5.5h10l-2.5-2.5" />
    <path d="M13.5 10.5h-10l2.5 2.5" />
  </Svg>
);

/** One entry laid over another: the fitter's entry for the position was overtaken by another tablet's (decision 42). */
export const OvertakenMark = ({ className }: { className?: string }) => (
  <Svg className={className}>
    <rect x="2" y="6" width="8" height="8" rx="1" />
    <rect x="6" y="2" width="8" height="8" rx="1" fill="currentColor" />
  </Svg>
);

/** Flags shown as small badges with their own background, readable on light and dark tiles alike. */
export const overLimitBadge = 'bg-alarm-500 text-white';
export const changeBadge = 'bg-caution-500 text-basalt-950';
/** Square, unlike the round flags: it tells of another fitter's entry, not of the disc. */
export const overtakenBadge = 'rounded-sm bg-basalt-950 text-white';

export function Legend() {
  const item = (mark: ReactNode, text: string) => (
    <li className="flex items-center gap-2">
      {mark}
      <span>{text}</span>
    </li>
  );
  const badge = (cls: string, mark: ReactNode) => (
    <span className={`inline-flex h-5 w-5 items-center justify-center rounded-full ${cls}`}>{mark}</span>
  );
  return (
    <ul aria-label="Legend" className="flex flex-wrap gap-x-4 gap-y-1 text-caption text-basalt-800">
      {item(
        <span className="inline-flex h-5 w-5 items-center justify-center rounded bg-basalt-800 text-white">
          <DoneMark />
        </span>,
        'Saved',
      )}
      {item(
        <span className="inline-flex h-5 w-5 items-center justify-center rounded border-2 border-dashed border-basalt-800">
          <WaitingMark className="h-3.5 w-3.5" />
        </span>,
        'Waiting to send',
      )}
      {item(
        <span className="inline-flex h-5 w-5 items-center justify-center rounded border-2 border-alarm-700 bg-alarm-100 text-alarm-700">
          <RefusedMark />
        </span>,
        'Refused',
      )}
      {item(<DraftMark />, 'Edited, not saved')}
      {item(badge(overLimitBadge, <OverLimitMark className="h-3 w-3" />), 'Over limit')}
      {item(badge(changeBadge, <ChangeMark className="h-3.5 w-3.5" />), 'Needs a change')}
      {item(
        <span className={`inline-flex h-5 w-5 items-center justify-center ${overtakenBadge}`}>
          <OvertakenMark className="h-3.5 w-3.5" />
        </span>,
        'Your entry overtaken by another tablet',
      )}
    </ul>
  );
}
