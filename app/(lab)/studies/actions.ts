"use server";

import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { z } from "zod";
import { db } from "@/db/client";
import { createStudy } from "@/db/queries/studies";
import { runAction, type ActionState } from "@/lib/auth/action";
import { actorOf } from "@/lib/auth/session";
import { createStudyBody } from "@/lib/studies/input";

const FIELDS = ["analyte", "title", "kind", "method", "specimen", "criteria", "collectedFrom", "collectedTo"] as const;

/** The form's text as the API's body: blank fields left out, so the one schema checks both. */
const newStudyForm = z.preprocess(
  (entries) => {
    const form = entries as Record<string, unknown>;
    const body: Record<string, string> = {};
    for (const field of FIELDS) {
      const value = form[field];
      if (typeof value === "string" && value.trim() !== "") body[field] = value;
    }
    if (body.analyte === undefined) body.analyte = "";
    if (body.title === undefined) body.title = "";
    return body;
  },
  createStudyBody
    .extend({ analyte: z.string().trim().min(1, "Choose the analyte the study is for.").max(16) })
    .refine((b) => !b.collectedFrom || !b.collectedTo || b.collectedFrom <= b.collectedTo, {
      path: ["collectedTo"],
      message: "The collection period ends on or after the day it starts.",
    }),
);

/** Opens a study (directors and scientists) and goes to it. */
export async function createStudyAction(_prev: ActionState, formData: FormData): Promise<ActionState> {
  let created: string | null = null;
  const state = await runAction("studies:write", newStudyForm, formData, async (caller, input) => {
    const study = await createStudy(db(), { input, actor: actorOf(caller) });
    created = study.id;
    revalidatePath("/studies");
    return `Opened the study "${study.title}".`;
  });
  // redirect() works by throwing, so it is called outside runAction, which would catch it.
  if (created) redirect(`/studies/${created}`);
  return state;
}
