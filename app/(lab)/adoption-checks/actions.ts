"use server";

import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { z } from "zod";
import { db } from "@/db/client";
import { createAdoptionCheck, recordSecondSet } from "@/db/queries/adoption-checks";
import { createIntervalVersion } from "@/db/queries/interval-versions";
import { createAdoptionCheckBody, secondSetBody } from "@/lib/adoption/input";
import { parseValuesText } from "@/lib/adoption/values-text";
import { AppError } from "@/lib/api/errors";
import { zodIssues } from "@/lib/api/problem";
import { runAction, type ActionState } from "@/lib/auth/action";
import { actorOf } from "@/lib/auth/session";
import { readValueColumn, UploadError } from "@/lib/uploads";
import { readNumberText } from "@/lib/uploads/values";

/** The form's fields as text (and the optional file); the API's schema then checks the body. */
const checkForm = z.object({
  analyte: z.string().default(""),
  sex: z.string().default(""),
  lower: z.string().default(""),
  upper: z.string().default(""),
  source: z.string().default(""),
  values: z.string().default(""),
  file: z.unknown().optional(),
});
const valuesForm = z.object({ id: z.uuid("The adoption check id must be a UUID."), values: z.string().default(""), file: z.unknown().optional() });
const draftForm = z.object({ id: z.uuid("The adoption check id must be a UUID."), analyte: z.string(), note: z.string().default("") });

function fieldError(path: string, message: string): AppError {
  return new AppError("invalid", "Please correct the marked fields.", { errors: [{ path, message }] });
}

function limitOf(text: string, name: string): number | null {
  const t = text.trim();
  if (t === "") return null;
  const out = { value: 0 };
  const message = readNumberText(t, false, name, out);
  if (message !== null) throw fieldError(name, `${message}; use a decimal point, or leave it empty for a one-sided interval.`);
  return out.value;
}

/** The values from the file when one is given, else from the text; messages name the problem. */
async function valuesOf(text: string, file: unknown): Promise<unknown[]> {
  if (file instanceof File && file.size > 0) {
    try {
      const column = await readValueColumn(new Uint8Array(await file.arrayBuffer()));
      if (column.problems.length > 0) {
        const p = column.problems[0];
        throw fieldError("values", `${file.name}, row ${p.row}: ${p.message}${column.problems.length > 1 ? ` (and ${column.problems.length - 1} more)` : ""}.`);
      }
      return column.values;
    } catch (err) {
      if (err instanceof UploadError) throw fieldError("values", `${file.name}: ${err.message}.`);
      throw err;
    }
  }
  const { values, problems } = parseValuesText(text);
  if (problems.length > 0) throw fieldError("values", `${problems[0]}; use a decimal point and separate the values by lines, spaces or commas.`);
  return values;
}

function checked<T extends z.ZodType>(schema: T, body: unknown): z.output<T> {
  const parsed = schema.safeParse(body);
  if (!parsed.success) {
    const errors = zodIssues(parsed.error).map((e) => ({ path: e.path.split(".")[0], message: e.message }));
    throw new AppError("invalid", "Please correct the marked fields.", { errors });
  }
  return parsed.data;
}

/** Records an adoption check (directors and scientists) and goes to its decision. */
export async function createAdoptionCheckAction(_prev: ActionState, formData: FormData): Promise<ActionState> {
  let created: string | null = null;
  const state = await runAction("studies:write", checkForm, formData, async (caller, form) => {
    const values = await valuesOf(form.values, form.file);
    const body = checked(createAdoptionCheckBody, {
      analyte: form.analyte,
      sex: form.sex === "" ? null : form.sex,
      lower: limitOf(form.lower, "lower"),
      upper: limitOf(form.upper, "upper"),
      source: form.source,
      values,
    });
    const check = await createAdoptionCheck(db(), { input: body, actor: actorOf(caller) });
    created = check.id;
    revalidatePath("/adoption-checks");
    return "Recorded the adoption check.";
  });
  // redirect() works by throwing, so it is called outside runAction, which would catch it.
  if (created) redirect(`/adoption-checks/${created}`);
  return state;
}

/** Adds the second set of 20 to a check that asked for it. */
export async function secondSetAction(_prev: ActionState, formData: FormData): Promise<ActionState> {
  return runAction("studies:write", valuesForm, formData, async (caller, form) => {
    const values = await valuesOf(form.values, form.file);
    const body = checked(secondSetBody, { values });
    const check = await recordSecondSet(db(), { id: form.id, values: body.values, actor: actorOf(caller) });
    revalidatePath(`/adoption-checks/${form.id}`);
    revalidatePath("/adoption-checks");
    return `Recorded the second set: ${check.second?.outside} of ${check.second?.n} outside.`;
  });
}

/** Drafts an interval version from an accepted check. */
export async function draftFromCheckAction(_prev: ActionState, formData: FormData): Promise<ActionState> {
  return runAction("studies:write", draftForm, formData, async (caller, form) => {
    const version = await createIntervalVersion(db(), {
      input: { analyte: form.analyte, adoptionCheck: form.id, note: form.note.trim() === "" ? undefined : form.note.trim() },
      actor: actorOf(caller),
    });
    revalidatePath(`/adoption-checks/${form.id}`);
    return `Drafted version ${version.number} of ${version.analyte.code}: submit it for sign-off when it is ready.`;
  });
}
