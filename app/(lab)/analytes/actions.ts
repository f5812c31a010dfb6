"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { db } from "@/db/client";
import { createAnalyte, updateAnalyte } from "@/db/queries/analytes";
import { analyteBodyFromForm, analyteCodeSchema, createAnalyteBody, updateAnalyteBody } from "@/lib/analytes/input";
import { AppError } from "@/lib/api/errors";
import { zodIssues } from "@/lib/api/problem";
import { runAction, type ActionState } from "@/lib/auth/action";
import { actorOf } from "@/lib/auth/session";

// The forms send text; analyteBodyFromForm gives it the API's shape, so both answer to one schema.
const createForm = z.preprocess((form) => analyteBodyFromForm(toFormData(form), "create"), createAnalyteBody);
// The code says which analyte; the rest is the change, checked by the API's schema in the work so
// that its field names stay the form's own.
const updateForm = z.object({ code: analyteCodeSchema }).passthrough();

/** runAction hands the schema the form's entries as an object; rebuild the FormData view of them. */
function toFormData(entries: unknown): FormData {
  const form = new FormData();
  for (const [key, value] of Object.entries(entries as Record<string, unknown>)) {
    if (typeof value === "string") form.append(key, value);
  }
  return form;
}

export async function createAnalyteAction(_prev: ActionState, formData: FormData): Promise<ActionState> {
  return runAction("analytes:write", createForm, formData, async (caller, input) => {
    const analyte = await createAnalyte(db(), { input, actor: actorOf(caller) });
    revalidatePath("/analytes");
    return `Added ${analyte.code} (${analyte.name}, ${analyte.unit}) to the catalogue.`;
  });
}

export async function updateAnalyteAction(_prev: ActionState, formData: FormData): Promise<ActionState> {
  return runAction("analytes:write", updateForm, formData, async (caller, { code }) => {
    const parsed = updateAnalyteBody.safeParse(analyteBodyFromForm(formData, "update"));
    if (!parsed.success) {
      throw new AppError("invalid", "Please correct the marked fields.", { errors: zodIssues(parsed.error) });
    }
    const saved = await updateAnalyte(db(), { code, changes: parsed.data, actor: actorOf(caller) });
    revalidatePath("/analytes");
    return `Saved ${saved.code} (${saved.name}, ${saved.unit}).`;
  });
}
