/**
 * How close any bound of the certificate's relaxation can come (decision 51): the linear
 * relaxation of the coupling "a change needs a stop" — the limit the Lagrangian steps climb
 * towards (Geoffrion 1974) — solved exactly by HiGHS (tests/support/stop-reference.ts, a model
 * built from the input alone), beside the proven optimum, on the lattice case and on the demo
 * drive cut to horizons HiGHS can hold (its WebAssembly build has 2 GB; the demo drive at 800 m,
 * 1.7 million columns, does not fit). "The optimum is X % above the relaxation" is the smallest
 * gap a certificate from this relaxation could ever show. Slow: minutes.
 */
import { planStops, type StopPlanInput } from '../../shared/domain/stop-planner';
import { lagrangianBound } from '../../shared/domain/stop-planner-steps/lagrangian';
import { prepare } from '../../shared/domain/stop-planner-steps/model';
import { highsMinH } from '../support/stop-reference';
import { latticeCaseInput } from './stop-planner.bench';

/** States the exact search may use for the optimum beside the relaxation (the demo drive at 600 m needs ~185,000). */
const EXACT_MAX_STATES = 400_000;

async function relaxationLine(name: string, input: StopPlanInput): Promise<string> {
  const t0 = performance.now();
  const relaxedH = await highsMinH(input, { integer: false });
  const lpS = (performance.now() - t0) / 1000;
  const t1 = performance.now();
  const r = planStops(input, { maxStates: EXACT_MAX_STATES });
  const exactS = (performance.now() - t1) / 1000;
  if (relaxedH === null || !r.feasible) return `${name}: infeasible`;
  const optH = r.optimised.cost.totalH;
  const plain = lagrangianBound(prepare(input), { iterations: 3000, upperH: optH, targetGap: 0 });
  const above = (h: number) => `${((100 * (optH - h)) / h).toFixed(2)} %`;
  return (
    `${name}: ${r.certificate.proven ? 'proven optimum' : `best plan found (NOT proven, ${EXACT_MAX_STATES} states)`} ${optH.toFixed(2)} h in ${exactS.toFixed(1)} s; ` +
    `linear relaxation (HiGHS) ${relaxedH.toFixed(2)} h in ${lpS.toFixed(1)} s — the optimum is ${above(relaxedH)} above it; ` +
    `Lagrangian bound after 3,000 steps ${plain.lowerH.toFixed(2)} h (${above(plain.lowerH)})`
  );
}

export async function benchRelaxation(): Promise<string[]> {
  const lines: string[] = [];
  for (const horizonM of [400, 800]) lines.push(await relaxationLine(`relaxation, lattice case ${horizonM} m`, latticeCaseInput(horizonM)));
  const { db } = await import('../../server/db/client');
  const { seedDemo } = await import('../../server/db/seed-demo');
  const { stopPlanInputFor } = await import('../../server/services/stops');
  const { projectId } = await seedDemo(db);
  for (const horizonM of [450, 600]) {
    const input = await stopPlanInputFor(db, projectId, new Date(), { horizonM });
    lines.push(
      input ? await relaxationLine(`relaxation, demo drive ${horizonM} m`, input) : `relaxation, demo drive ${horizonM} m: nothing to plan`,
    );
  }
  return lines;
}
