import "server-only";
import { notFound } from "next/navigation";
import { z } from "zod";
import { db } from "@/db/client";
import { versionReview } from "@/db/queries/version-review";
import { AppError } from "@/lib/api/errors";

/** The version's review data, or the not-found page for an unknown or malformed id. */
export async function loadVersionReview(id: string, { donorLevel }: { donorLevel: boolean }) {
  if (!z.uuid().safeParse(id).success) notFound();
  try {
    return await versionReview(db(), { id, donorLevel });
  } catch (err) {
    if (err instanceof AppError && err.code === "not_found") notFound();
    throw err;
  }
}
