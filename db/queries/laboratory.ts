import "server-only";
import { eq } from "drizzle-orm";
import type { Executor } from "../client";
import { laboratory } from "../schema";

export async function getLaboratoryName(executor: Executor): Promise<string> {
  const [row] = await executor.select({ name: laboratory.name }).from(laboratory).where(eq(laboratory.id, 1)).limit(1);
  return row?.name ?? "Laboratory not yet named";
}
