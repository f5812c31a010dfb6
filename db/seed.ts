/**
 * The demo: an invented regional hospital laboratory with one user per role. Every name here is
 * made up for Bellwether's demo; the passwords are listed in the README.
 */
import type { Database } from "./client";
import { recordAuditEvent, SYSTEM_ACTOR } from "./queries/audit";
import { countUsers, createUser } from "./queries/users";
import { DEMO_LABORATORY, DEMO_USERS } from "./demo-accounts";
import { laboratory } from "./schema";

export { DEMO_LABORATORY, DEMO_USERS };

/** Seeds the demo into an empty database; does nothing when any user exists. Returns whether it seeded. */
export async function seedDemo(database: Database): Promise<boolean> {
  if ((await countUsers(database)) > 0) return false;
  await database.insert(laboratory).values({ id: 1, name: DEMO_LABORATORY }).onConflictDoNothing();
  for (const u of DEMO_USERS) {
    await createUser(database, { input: u, actor: SYSTEM_ACTOR, allowPublishedPassword: true });
  }
  await recordAuditEvent(database, {
    actor: SYSTEM_ACTOR,
    action: "demo.seeded",
    entityType: "laboratory",
    entityId: "1",
    summary: `Seeded the demo laboratory "${DEMO_LABORATORY}"`,
  });
  return true;
}
