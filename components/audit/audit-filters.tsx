import { Button } from "@/components/ui/button";
import { SelectField, TextField } from "@/components/ui/field";

/** A plain GET form: filters live in the URL, so a filtered view can be bookmarked or shared. */
export function AuditFilters({ values, errors = {}, actions, entityTypes }: {
  values: { actor?: string; action?: string; entityType?: string; text?: string; from?: string; to?: string };
  /** Messages for the days that could not be read; the typed text stays in the field. */
  errors?: { from?: string; to?: string };
  actions: string[];
  entityTypes: string[];
}) {
  const any = (label: string) => [{ value: "", label }];
  return (
    <form method="get" action="/audit" className="grid gap-3 sm:grid-cols-3 lg:grid-cols-6" aria-label="Filter the audit trail">
      <TextField label="Who" name="actor" defaultValue={values.actor} placeholder="e-mail or part of it" />
      <SelectField
        label="Action"
        name="action"
        defaultValue={values.action ?? ""}
        options={[...any("Any action"), ...actions.map((a) => ({ value: a, label: a }))]}
      />
      <SelectField
        label="Record"
        name="entityType"
        defaultValue={values.entityType ?? ""}
        options={[...any("Any record"), ...entityTypes.map((t) => ({ value: t, label: t }))]}
      />
      <TextField label="From" name="from" defaultValue={values.from} placeholder="YYYY-MM-DD" inputMode="numeric" error={errors.from} />
      <TextField label="To" name="to" defaultValue={values.to} placeholder="YYYY-MM-DD" inputMode="numeric" error={errors.to} />
      <TextField label="Text" name="text" defaultValue={values.text} placeholder="in the summary" />
      <div className="flex gap-2 sm:col-span-3 lg:col-span-6">
        <Button type="submit">Apply filters</Button>
        <a href="/audit" className="self-center text-sm">
          Clear
        </a>
      </div>
    </form>
  );
}
