/**
 * Who gets a notification: the one place that picks mail recipients for the jobs and routes, and
 * honours each person's choices (shared/notifications.ts; users turn kinds off in their settings).
 * Stop mail goes to the stop's crew, whose members need not be users; a member who is a user and
 * turned the kind off is skipped. Every other kind goes to the project's active members in the
 * roles the kind is for (stop proposals to planners, parts digests to buyers, downtime digests to
 * site managers), less those who turned it off.
 */
import { and, asc, eq, inArray } from 'drizzle-orm';
import { notificationKinds, type NotificationKind } from '../../shared/notifications';
import type { DbOrTx } from '../db/client';
import { crewMembers, memberships, users } from '../db/schema';
import { optedOut } from '../lib/mail';

export interface Recipient {
  email: string;
  /** Null for a crew member who is not a Kerfwise user. */
  userId: string | null;
}

/** Kinds sent to a stop's crew rather than to roles. */
const crewKinds: ReadonlySet<NotificationKind> = new Set(['stop_published', 'stop_reminder']);

/**
 * The people of `projectId` to mail about `kind`, without those who turned it off. Crew kinds
 * need the stop's `crewId` (none: nobody).
 */
export async function recipientsFor(
  tx: DbOrTx,
  projectId: string,
  kind: NotificationKind,
  options: { crewId?: string | null } = {},
): Promise<Recipient[]> {
  let people: Recipient[];
  if (crewKinds.has(kind)) {
    if (!options.crewId) return [];
    people = await tx
      .select({ email: crewMembers.email, userId: crewMembers.userId })
      .from(crewMembers)
      .where(eq(crewMembers.crewId, options.crewId))
      .orderBy(asc(crewMembers.name), asc(crewMembers.email));
  } else {
    const roles = [...notificationKinds.find((k) => k.key === kind)!.roles];
    people = await tx
      .select({ email: users.email, userId: users.id })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(and(eq(memberships.projectId, projectId), inArray(memberships.role, roles), eq(users.active, true)))
      .orderBy(asc(users.email));
  }
  const off = await optedOut(
    tx,
    people.flatMap((p) => (p.userId ? [p.userId] : [])),
    kind,
  );
  return people.filter((p) => !p.userId || !off.has(p.userId));
}
