import { useEffect, useRef, type ReactNode } from 'react';
import { conditionNeedsChange, wearState } from '../../../../shared/cutters';
import type { RoundEntry, RoundPosition } from '../api';
import type { QueuedEntry } from '../../../lib/outbox';
import {
  changeBadge,
  ChangeMark,
  DoneMark,
  DraftMark,
  overLimitBadge,
  OverLimitMark,
  overtakenBadge,
  OvertakenMark,
  RefusedMark,
  WaitingMark,
} from './marks';

export type PositionState = 'todo' | 'saved' | 'waiting' | 'refused';

export interface PositionMark {
  state: PositionState;
  overLimit: boolean;
  needsChange: boolean;
  /** The fitter changed something on the screen and has not saved it. */
  edited: boolean;
  /** This fitter's entry for the position was overtaken by another's later one: who overtook it; null when not. */
  overtakenBy: string | null;
}

/**
 * The state of a position in this round: the newest queued entry wins over what the server has;
 * for a queued entry the flags are worked out here the way the server does (limit reached, or a
 * condition that calls for a change, and no change made).
 */
export function positionMark(
  position: RoundPosition,
  stored: RoundEntry | undefined,
  queued: QueuedEntry | undefined,
  edited: boolean,
  overtakenBy: string | null = null,
): PositionMark {
  if (queued) {
    const { overLimit } = wearState(queued.body.wearMm, position.wearLimitMm);
    const needsChange = queued.body.action === 'none' && (overLimit || conditionNeedsChange(queued.body.conditions));
    return { state: queued.state === 'attention' ? 'refused' : 'waiting', overLimit, needsChange, edited, overtakenBy };
  }
  if (stored) return { state: 'saved', overLimit: stored.overLimit, needsChange: stored.needsChange, edited, overtakenBy };
  return { state: 'todo', overLimit: false, needsChange: false, edited, overtakenBy };
}

const stateWords: Record<PositionState, string> = {
  todo: 'not done',
  saved: 'saved',
  waiting: 'waiting to be sent',
  refused: 'refused, needs attention',
};

const tileStyle: Record<PositionState, string> = {
  todo: 'border-2 border-basalt-400 bg-white text-basalt-900',
  saved: 'border-2 border-basalt-800 bg-basalt-800 text-white',
  waiting: 'border-[3px] border-dashed border-basalt-800 bg-basalt-100 text-basalt-900',
  refused: 'border-[3px] border-alarm-700 bg-alarm-100 text-alarm-700',
};

const stateMark: Record<PositionState, (p: { className?: string }) => ReactNode> = {
  todo: () => null,
  saved: DoneMark,
  waiting: WaitingMark,
  refused: RefusedMark,
};

interface Props {
  positions: RoundPosition[];
  marks: Map<string, PositionMark>;
  currentId: string;
  onPick: (positionId: string) => void;
  /** All positions wrapped into a grid; otherwise one row that scrolls, centred on the current one. */
  grid: boolean;
}

/** Every position of the head in walking order, each with its state marks. */
export function PositionStrip({ positions, marks, currentId, onPick, grid }: Props) {
  const current = useRef<HTMLButtonElement>(null);
  useEffect(() => {
    current.current?.scrollIntoView({ block: 'nearest', inline: 'center' });
  }, [currentId, grid]);
  return (
    <ol id="position-strip" aria-label="Positions" className={`flex gap-1.5 p-2 ${grid ? 'flex-wrap' : 'overflow-x-auto'}`}>
      {positions.map((p) => {
        const m = marks.get(p.id)!;
        const Mark = stateMark[m.state];
        const isCurrent = p.id === currentId;
        const words = [
          stateWords[m.state],
          m.overLimit && 'over the wear limit',
          m.needsChange && 'needs a change',
          m.edited && 'edited, not saved',
          m.overtakenBy != null && `your entry overtaken by ${m.overtakenBy}`,
        ]
          .filter(Boolean)
          .join(', ');
        return (
          <li key={p.id} className="shrink-0">
            <button
              ref={isCurrent ? current : undefined}
              type="button"
              onClick={() => onPick(p.id)}
              aria-current={isCurrent ? 'step' : undefined}
              aria-label={`Position ${p.number}: ${words}`}
              title={`Position ${p.number}: ${words}`}
              className={`relative flex h-11 w-11 items-center justify-center rounded-md text-body font-bold ${tileStyle[m.state]} ${isCurrent ? 'ring-4 ring-ember-500 ring-offset-2' : ''}`}
            >
              {p.number}
              <span className="absolute left-px top-px">
                <Mark className="h-3.5 w-3.5" />
              </span>
              {m.edited && (
                <span className="absolute bottom-px left-px">
                  <DraftMark className="h-3.5 w-3.5" />
                </span>
              )}
              {m.overLimit && (
                <span
                  className={`absolute -right-1 -top-1 inline-flex h-[18px] w-[18px] items-center justify-center rounded-full ring-2 ring-white ${overLimitBadge}`}
                >
                  <OverLimitMark className="h-2.5 w-2.5" />
                </span>
              )}
              {m.overtakenBy != null && (
                <span
                  data-mark="overtaken"
                  className={`absolute -bottom-1.5 left-1/2 inline-flex h-4 w-4 -translate-x-1/2 items-center justify-center ring-2 ring-white ${overtakenBadge}`}
                >
                  <OvertakenMark className="h-3 w-3" />
                </span>
              )}
              {m.needsChange && (
                <span
                  className={`absolute -bottom-1 -right-1 inline-flex h-[18px] w-[18px] items-center justify-center rounded-full ring-2 ring-white ${changeBadge}`}
                >
                  <ChangeMark className="h-3 w-3" />
                </span>
              )}
            </button>
          </li>
        );
      })}
    </ol>
  );
}
