import { z } from 'zod';
import { calendarDate, freeText, requiredLine, singleLine } from './fields';
import { discConditions } from '../cutters';
import type { PartKind } from '../domain/parts-projection';

/** Kinds of catalogue part (the same list as the database enum `part_kind`). */
export const partKinds = ['ring', 'bearing-kit', 'seal-kit', 'cutter-assembly', 'hub', 'small-part'] as const satisfies readonly PartKind[];

export const partKindLabels: Record<PartKind, string> = {
  ring: 'Ring',
  'bearing-kit': 'Bearing kit',
  'seal-kit': 'Seal kit',
  'cutter-assembly': 'Complete cutter assembly',
  hub: 'Hub',
  'small-part': 'Small part',
};

/**
 * What a removed cutter can come back to the workshop with: normal wear ('worn'), or one of the
 * disc conditions a fitter records (shared/cutters.ts). Each has a bill of materials or 'scrap'.
 */
export const workshopConditions = [
  { key: 'worn', label: 'Normal wear (ring worn to its limit)' },
  ...discConditions.map((c) => ({ key: c.key, label: c.label })),
] as const;
export type WorkshopCondition = (typeof workshopConditions)[number]['key'];
export const workshopConditionKeys = workshopConditions.map((c) => c.key) as [WorkshopCondition, ...WorkshopCondition[]];

const days = (label: string, max: number) =>
  z
    .number({ message: `${label} must be a number of days.` })
    .min(0, `${label} cannot be negative.`)
    .max(max, `${label} must be at most ${max} days.`);

/** A catalogue part as the buyer enters it. Rings and complete assemblies are catalogued per disc size. */
export const partInputSchema = z
  .object({
    code: requiredLine('A part code', 40, 'Enter the part code.'),
    name: requiredLine('The part name', 200, 'Enter a name for the part.'),
    kind: z.enum(partKinds, { message: 'Choose the kind of part.' }),
    discSizeIn: z
      .number({ message: 'The disc size must be a number of inches.' })
      .min(10, 'Disc sizes run from 10″ to 24″.')
      .max(24, 'Disc sizes run from 10″ to 24″.')
      .nullable()
      .default(null),
    unitCost: z
      .number({ message: 'The unit cost must be a number.' })
      .min(0, 'The unit cost cannot be negative.')
      .max(1e8)
      .multipleOf(0.01, 'The unit cost has at most 2 decimals.'),
    currency: z
      .string()
      .trim()
      .regex(/^[A-Z]{3}$/, 'The currency is a three-letter code such as EUR.')
      .default('EUR'),
    supplier: singleLine('The supplier', 200).default(''),
    leadTimeMeanDays: days('The lead time', 730).gt(0, 'The lead time must be more than 0 days.'),
    leadTimeSdDays: days('The lead-time spread', 365).default(0),
    minOrderQty: z
      .number({ message: 'The minimum order quantity must be a whole number.' })
      .int('The minimum order quantity must be a whole number.')
      .min(1, 'The minimum order quantity is at least 1.')
      .max(100_000)
      .default(1),
  })
  .refine((p) => !(p.kind === 'ring' || p.kind === 'cutter-assembly') || p.discSizeIn != null, {
    path: ['discSizeIn'],
    message: 'Give the disc size of a ring or a cutter assembly.',
  });
export type PartInput = z.infer<typeof partInputSchema>;

/** A stock count: what is on the shelf now; the difference to the book stock becomes a 'count' movement. */
export const stockCountInputSchema = z.object({
  countedQty: z
    .number({ message: 'Enter the counted quantity.' })
    .int('Count whole units.')
    .min(0, 'Stock cannot be negative: enter what is on the shelf (0 or more).')
    .max(1_000_000),
  note: freeText('The note', 500).default(''),
});
export type StockCountInput = z.infer<typeof stockCountInputSchema>;

const isoDate = z
  .string({ message: 'Enter a date.' })
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Enter the date as YYYY-MM-DD.')
  .refine(
    (s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s),
    'That date does not exist.',
  )
  .pipe(calendarDate('The due date'));

export const purchaseOrderInputSchema = z.object({
  number: requiredLine('An order number', 40, 'Enter the order number.'),
  supplier: singleLine('The supplier', 200).default(''),
  note: freeText('The note', 1000).default(''),
  lines: z
    .array(
      z.object({
        partId: z.uuid({ message: 'Choose a part from the catalogue.' }),
        qtyOrdered: z
          .number({ message: 'The quantity must be a whole number.' })
          .int('The quantity must be a whole number.')
          .min(1, 'Order at least 1.')
          .max(1_000_000),
        dueDate: isoDate,
      }),
    )
    .min(1, 'An order needs at least one line.')
    .max(200),
});
export type PurchaseOrderInput = z.infer<typeof purchaseOrderInputSchema>;

/**
 * Several purchase orders saved together (e.g. filled from the suggestions): one per supplier, each
 * with its own number. Saved in one transaction: all or none.
 */
export const purchaseOrderBatchInputSchema = z
  .object({
    orders: z.array(purchaseOrderInputSchema).min(1, 'Send at least one order.').max(50, 'Save at most 50 orders at once.'),
  })
  .superRefine((batch, ctx) => {
    const numbers = new Map<string, number>();
    const suppliers = new Map<string, number>();
    batch.orders.forEach((o, i) => {
      const n = numbers.get(o.number);
      if (n !== undefined)
        ctx.addIssue({
          code: 'custom',
          path: ['orders', i, 'number'],
          message: `Orders ${n + 1} and ${i + 1} have the same number ${o.number}.`,
        });
      else numbers.set(o.number, i);
      const key = o.supplier.trim().toLowerCase();
      const sup = suppliers.get(key);
      if (sup !== undefined)
        ctx.addIssue({
          code: 'custom',
          path: ['orders', i, 'supplier'],
          message: `Orders ${sup + 1} and ${i + 1} go to the same supplier (${o.supplier || 'none given'}): put their lines in one order.`,
        });
      else suppliers.set(key, i);
    });
  });
export type PurchaseOrderBatchInput = z.infer<typeof purchaseOrderBatchInputSchema>;

export const receiveLineInputSchema = z.object({
  qty: z.number({ message: 'Enter the quantity received.' }).int('Receive whole units.').min(1, 'Receive at least 1.').max(1_000_000),
  note: freeText('The note', 500).default(''),
});
export type ReceiveLineInput = z.infer<typeof receiveLineInputSchema>;

const bomLineSchema = z.object({
  partId: z.uuid({ message: 'Choose a part from the catalogue.' }),
  qty: z.number({ message: 'The quantity must be a number.' }).gt(0, 'A bill-of-materials quantity must be more than 0.').max(100),
});
export const rebuildOutcomeSchema = z.union([z.literal('scrap'), z.array(bomLineSchema).max(20)]);
export type RebuildOutcomeInput = z.infer<typeof rebuildOutcomeSchema>;

/** The workshop loop: turnaround, most rebuilds, and per cutter assembly what every condition needs (or scrap). */
export const workshopSettingsInputSchema = z.object({
  turnaroundDays: days('The turnaround', 365),
  maxRebuilds: z
    .number({ message: 'The number of rebuilds must be a whole number.' })
    .int('The number of rebuilds must be a whole number.')
    .min(0, 'The number of rebuilds cannot be negative.')
    .max(20),
  serviceLevel: z
    .number({ message: 'The service level must be a number.' })
    .min(0.5, 'The service level is at least 50 %.')
    .max(0.999, 'The service level is at most 99.9 %.'),
  /** Assembly part id → condition → bill of materials or 'scrap'; every condition must be given. */
  boms: z.record(
    z.uuid({ message: 'Bills of materials are keyed by the cutter assembly part.' }),
    z.record(z.enum(workshopConditionKeys), rebuildOutcomeSchema),
  ),
});
export type WorkshopSettingsInput = z.infer<typeof workshopSettingsInputSchema>;

/** Query of GET /parts/demand: horizon in weeks and, optionally, another service level than the workshop setting. */
export const demandQuerySchema = z.object({
  weeks: z.coerce
    .number({ message: 'The horizon must be a whole number of weeks.' })
    .int('The horizon must be a whole number of weeks.')
    .min(1, 'Look at least 1 week ahead.')
    .max(52, 'Look at most 52 weeks ahead.')
    .default(12),
  serviceLevel: z.coerce
    .number({ message: 'The service level must be a number.' })
    .min(0.5, 'The service level is at least 0.5.')
    .max(0.999, 'The service level is at most 0.999.')
    .optional(),
});
export type DemandQuery = z.infer<typeof demandQuerySchema>;

// ----- what the demand API answers (server/services/parts.ts builds it; the client reads it) -----

/** Where a week's demand comes from: a stop, a due position on no stop, or sudden failures. */
export interface DemandSource {
  kind: 'stop' | 'forecast' | 'failures';
  stopId: string | null;
  qty: number;
}

/** An order suggestion for one part (DOMAIN.md §6, worked in weeks). */
export interface OrderSuggestion {
  partId: string;
  code: string;
  name: string;
  kind: PartKind;
  supplier: string;
  currency: string;
  unitCost: number;
  minOrderQty: number;
  onHand: number;
  onOrder: number;
  leadTimeWeeks: number;
  leadTimeSdWeeks: number;
  meanWeeklyDemand: number;
  weeklyDemandSd: number;
  safetyStock: number;
  reorderPoint: number;
  /** Whole weeks the order must bridge (lead time rounded up, at least 1). */
  leadTimeWindowWeeks: number;
  leadTimeDemand: number;
  /** Rebuilt cutters back within the lead-time window. */
  rebuildsWithinLeadTime: number;
  /** On hand + every open order (whatever its due date) + rebuilt cutters back within the window. */
  inventoryPosition: number;
  orderQty: number;
  orderNow: boolean;
  orderValue: number;
  /** On hand ÷ mean weekly demand; null when nothing is demanded in the horizon. */
  weeksOfCover: number | null;
  firstShortageWeek: number | null;
  firstShortageDate: string | null;
  /** The demand within the lead-time window by source: what makes the order necessary. */
  sources: DemandSource[];
}

export interface CataloguePart {
  id: string;
  code: string;
  name: string;
  kind: PartKind;
  discSizeIn: number | null;
  unitCost: number;
  currency: string;
  supplier: string;
  leadTimeMeanDays: number;
  leadTimeSdDays: number;
  minOrderQty: number;
  /** Sum of all stock movements. */
  onHand: number;
  /** Ordered and not yet received, on all open order lines. */
  onOrder: number;
}

/** GET /parts: the catalogue with stock and the 12-week order flag. */
export interface PartListItem extends CataloguePart {
  weeksOfCover: number | null;
  orderNow: boolean;
  orderQty: number;
  safetyStock: number;
  reorderPoint: number;
  firstShortageDate: string | null;
}

/** One part in one week of the horizon (shared/domain/parts-projection.ts `PartWeek`, its sources named `sources`). */
export interface DemandWeek {
  partId: string;
  week: number;
  /** Calendar date (YYYY-MM-DD) the week starts. */
  weekStartDate: string;
  demand: number;
  receipts: number;
  /** Rebuilt cutters back in ready stock (assemblies only). */
  rebuildReturns: number;
  /** Removed cutters scrapped (assemblies only). */
  scrapped: number;
  /** Stock at the end of the week; negative means a shortage. */
  projectedStock: number;
  sources: DemandSource[];
}

/** An open stop the demand counts; `TDate` is Date on the server and the ISO text the client receives. */
export interface DemandStop<TDate = string> {
  id: string;
  status: string;
  chainageM: number;
  ringNumber: number | null;
  plannedStart: TDate | null;
  /** Where the change week comes from: the stop's date, or the positions' P90 dates. */
  dateBasis: 'planned' | 'p90';
  positionNumbers: number[];
  /** Plain-words name for lists, CSV and mail. */
  label: string;
}

/** GET /parts/demand; `TDate` is Date on the server (server/services/parts.ts) and ISO text on the client. */
export interface PartsDemand<TDate = string> {
  now: TDate;
  startDate: string;
  horizonWeeks: number;
  serviceLevel: number;
  z: number;
  parts: CataloguePart[];
  weeks: DemandWeek[];
  suggestions: OrderSuggestion[];
  stops: DemandStop<TDate>[];
  estimate: {
    /** Km all discs are expected to roll per week (the basis of the sudden failures). */
    rolledKmPerWeek: number[];
    suddenFailuresPerWeek: number[];
    geologyEndsWeek: number | null;
  };
  problems: string[];
}

export interface OrderLine {
  id: string;
  purchaseOrderId: string;
  partId: string;
  partCode: string;
  partName: string;
  qtyOrdered: number;
  qtyReceived: number;
  qtyOpen: number;
  dueDate: string;
}

export interface PurchaseOrder {
  id: string;
  number: string;
  supplier: string;
  orderedAt: string;
  note: string;
  open: boolean;
  lines: OrderLine[];
}

/** GET /parts: the catalogue with stock and order flags, and what kept the demand from being complete. */
export interface PartList {
  parts: PartListItem[];
  problems: string[];
}

/** POST /parts and PUT /parts/:partId: the part as saved (stock is read with GET /parts). */
export type PartRow = Omit<CataloguePart, 'onHand' | 'onOrder'>;

/** GET and PUT /parts/workshop: the workshop loop settings in force (the defaults until the buyer saves them). */
export type WorkshopSettings = WorkshopSettingsInput;

/** POST /parts/:partId/count: the counted stock and its difference from the book stock. */
export interface StockCounted {
  partId: string;
  onHand: number;
  difference: number;
}

/** One stock movement; `qty` is signed. */
export interface StockMovement {
  id: number;
  partId: string;
  at: string;
  qty: number;
  kind: string;
  note: string;
  purchaseOrderLineId: string | null;
  userId: string | null;
}

/** GET /parts/:partId/movements: the part and its last 200 movements, newest first. */
export interface PartMovements {
  part: PartRow;
  movements: StockMovement[];
}
