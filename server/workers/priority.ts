/**
 * The computation threads run at a lower CPU priority than the request thread (DEVELOPERS.md,
 * decision 49). A worker thread starts with its process's nice value, so on a 2-core machine a
 * 2 km stop plan competed on equal terms with the thread answering requests. Linux keeps a nice
 * value per thread, and `setpriority(PRIO_PROCESS, tid)` (which `os.setPriority` calls) acts on
 * that one thread; Node gives no thread id, but `/proc/thread-self` names it. Each computation
 * thread lowers its own priority when it starts; the request thread keeps the process's.
 */
import { readlinkSync } from 'node:fs';
import os from 'node:os';

/**
 * The nice value of the computation threads, the lowest priority there is: when a request thread (nice 0)
 * wants the same core, a thread at 19 gets about 1.5 % of it (Linux CFS weights 15 against 1024),
 * and the whole core when nothing else wants it (derived: kernel/sched/core.c, sched_prio_to_weight).
 * 10 (weight 110) was measured too: see DEVELOPERS.md, decision 49.
 */
export const COMPUTE_THREAD_NICE = 19;

export interface ThreadPriority {
  /** The thread's kernel id (Linux), or null where the thread cannot be named. */
  tid: number | null;
  /** The thread's nice value after the call (the process's where the thread cannot be named). */
  nice: number;
  /** Why the priority could not be lowered; null when it was. */
  problem: string | null;
}

/** This thread's kernel id, read from `/proc/thread-self` (Linux); null elsewhere. */
export function currentThreadId(): number | null {
  if (process.platform !== 'linux') return null;
  try {
    const tid = Number(readlinkSync('/proc/thread-self').split('/').pop());
    return Number.isInteger(tid) && tid > 0 ? tid : null;
  } catch {
    return null;
  }
}

/**
 * Lowers the calling thread's priority to `nice` (never raises it: a thread already nicer keeps its
 * value, and raising needs privileges). Only ever called in a computation thread: on the main thread
 * it would slow the requests it exists to protect.
 */
export function lowerThisThreadPriority(nice = COMPUTE_THREAD_NICE): ThreadPriority {
  const tid = currentThreadId();
  if (tid == null)
    return {
      tid,
      nice: os.getPriority(),
      problem: `${process.platform} gives no thread id: the computation threads keep the process's priority`,
    };
  try {
    if (os.getPriority(tid) < nice) os.setPriority(tid, nice);
    return { tid, nice: os.getPriority(tid), problem: null };
  } catch (error) {
    return {
      tid,
      nice: os.getPriority(tid),
      problem: `the computation thread's priority could not be lowered: ${(error as Error).message}`,
    };
  }
}
