import { and, asc, eq, inArray } from 'drizzle-orm';
import { Router } from 'express';
import { crewInputSchema, type Crew, type CrewRow } from '../../shared/schemas/crew';
import { db, type DbOrTx } from '../db/client';
import { crewMembers, crews, users } from '../db/schema';
import { requireAdmin, requireProject, requireUser } from '../middleware/auth';
import { audit } from '../lib/audit';
import { conflict, notFound } from '../lib/http-error';
import { idParam } from '../lib/params';
import { reply } from '../lib/reply';

/** Crews are read by every member (to pick one for a stop); the administrator keeps them. */
export const crewsRouter = Router({ mergeParams: true });

export async function listCrews(tx: DbOrTx, projectId: string) {
  const list = await tx.select().from(crews).where(eq(crews.projectId, projectId)).orderBy(asc(crews.name));
  const members = list.length
    ? await tx
        .select()
        .from(crewMembers)
        .where(
          inArray(
            crewMembers.crewId,
            list.map((c) => c.id),
          ),
        )
        .orderBy(asc(crewMembers.name))
    : [];
  return list.map((c) => ({ ...c, members: members.filter((m) => m.crewId === c.id) }));
}

crewsRouter.get('/', requireProject('stops.read'), async (req, res) => {
  reply<Crew[]>(res, 200, await listCrews(db, idParam(req.params, 'projectId', 'That project')));
});

async function saveMembers(tx: DbOrTx, crewId: string, members: { name: string; email: string }[]) {
  await tx.delete(crewMembers).where(eq(crewMembers.crewId, crewId));
  if (members.length === 0) return;
  const known = await tx
    .select({ id: users.id, email: users.email })
    .from(users)
    .where(
      inArray(
        users.email,
        members.map((m) => m.email),
      ),
    );
  await tx
    .insert(crewMembers)
    .values(members.map((m) => ({ crewId, name: m.name, email: m.email, userId: known.find((u) => u.email === m.email)?.id ?? null })));
}

crewsRouter.post('/', requireAdmin, async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const me = requireUser(req);
  const input = crewInputSchema.parse(req.body);
  const crew = await db.transaction(async (tx) => {
    const [dup] = await tx
      .select({ id: crews.id })
      .from(crews)
      .where(and(eq(crews.projectId, projectId), eq(crews.name, input.name)));
    if (dup) throw conflict(`There is already a crew called ${input.name}.`);
    const [row] = await tx.insert(crews).values({ projectId, name: input.name }).returning();
    await saveMembers(tx, row.id, input.members);
    await audit(tx, { userId: me.id, projectId, entity: 'crew', entityId: row.id, action: 'create', after: input });
    return row;
  });
  reply<CrewRow>(res, 201, crew);
});

crewsRouter.put('/:crewId', requireAdmin, async (req, res) => {
  const projectId = idParam(req.params, 'projectId', 'That project');
  const crewId = idParam(req.params, 'crewId', 'That crew');
  const me = requireUser(req);
  const input = crewInputSchema.parse(req.body);
  await db.transaction(async (tx) => {
    const [before] = await tx
      .select()
      .from(crews)
      .where(and(eq(crews.id, crewId), eq(crews.projectId, projectId)));
    if (!before) throw notFound('That crew');
    const beforeMembers = await tx.select().from(crewMembers).where(eq(crewMembers.crewId, crewId));
    await tx.update(crews).set({ name: input.name }).where(eq(crews.id, crewId));
    await saveMembers(tx, crewId, input.members);
    await audit(tx, {
      userId: me.id,
      projectId,
      entity: 'crew',
      entityId: crewId,
      action: 'update',
      before: { ...before, members: beforeMembers },
      after: input,
    });
  });
  const saved = (await listCrews(db, projectId)).find((c) => c.id === crewId);
  if (!saved) throw notFound('That crew');
  reply<Crew>(res, 200, saved);
});
