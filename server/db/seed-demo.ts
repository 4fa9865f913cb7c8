/**
 * The demo drive: an invented hard-rock headrace tunnel, its machine, one user per role, and six
 * months of simulated history (demo/simulate-drive.ts).
 * Loading is idempotent — what exists is left as it is (a second start neither duplicates nor
 * wipes anything), what is missing is added. Everything here is invented for the demo.
 */
import { eq } from 'drizzle-orm';
import type { ProjectRole } from '../../shared/roles';
import { hashPassword } from '../lib/password';
import type { Db } from './client';
import { loadDemoDowntime } from './demo/load-downtime';
import { loadDemoDrive } from './demo/load-drive';
import { loadDemoParts } from './demo/load-parts';
import { memberships, positions, projects, users } from './schema';

export const DEMO_PASSWORD = process.env.DEMO_PASSWORD ?? 'cutterhead-demo';

export const demoProject = {
  name: 'Eskerholt headrace tunnel — Drive North',
  machineDescription:
    'Open-gripper hard-rock TBM, 6.20 m bore, 17-inch disc cutters (4 twin centre discs, face and gauge discs), 1.5 m stroke',
  excavatedDiameterM: 6.2,
  startChainageM: 1250,
  driveDirection: 'increasing' as const,
  siteTimeZone: 'Europe/Zurich',
  units: 'metric' as const,
};

export const demoUsers: { email: string; name: string; isAdmin: boolean; role: ProjectRole | null }[] = [
  { email: 'admin@kerfwise.test', name: 'Alma Rudd', isAdmin: true, role: null },
  { email: 'fitter@kerfwise.test', name: 'Tomas Vella', isAdmin: false, role: 'fitter' },
  { email: 'planner@kerfwise.test', name: 'Ingrid Sayer', isAdmin: false, role: 'planner' },
  { email: 'buyer@kerfwise.test', name: 'Kofi Mensah', isAdmin: false, role: 'buyer' },
  { email: 'manager@kerfwise.test', name: 'Renata Duarte', isAdmin: false, role: 'site_manager' },
];

export async function seedDemo(db: Db): Promise<{ projectId: string; created: boolean }> {
  return db.transaction(async (tx) => {
    let created = false;
    let [project] = await tx.select().from(projects).where(eq(projects.name, demoProject.name)).limit(1);
    if (!project) {
      [project] = await tx.insert(projects).values(demoProject).returning();
      created = true;
    }
    const passwordHash = await hashPassword(DEMO_PASSWORD);
    let fitterId: string | null = null;
    for (const u of demoUsers) {
      const [user] = await tx
        .insert(users)
        .values({ email: u.email, name: u.name, isAdmin: u.isAdmin, passwordHash })
        .onConflictDoUpdate({ target: users.email, set: { email: u.email } })
        .returning({ id: users.id });
      if (u.role === 'fitter') fitterId = user.id;
      if (u.role) {
        await tx.insert(memberships).values({ userId: user.id, projectId: project.id, role: u.role }).onConflictDoNothing();
      }
    }
    // The drive's history goes in once, into a project without a cutterhead yet.
    const [anyPosition] = await tx.select({ id: positions.id }).from(positions).where(eq(positions.projectId, project.id)).limit(1);
    if (!anyPosition) {
      await loadDemoDrive(tx, project.id, fitterId);
      await loadDemoParts(tx, project.id);
      await loadDemoDowntime(tx, project.id);
    }
    return { projectId: project.id, created: created || !anyPosition };
  });
}
