import type { Metadata } from "next";
import Link from "next/link";
import { headers } from "next/headers";
import type { ReactNode } from "react";
import { CodeBlock } from "@/components/api-docs/code-block";
import { PageHeader, Panel } from "@/components/ui/panel";
import { apiExample, curlCommand, errorExamples, readableJson, type ApiExample } from "@/lib/api/examples";
import { DATABASE_RETRY_AFTER_SECONDS } from "@/lib/api/unavailable";
import { can } from "@/lib/auth/roles";
import { requirePageCaller } from "@/lib/auth/session";
import { DEFAULT_RATE_PER_MINUTE } from "@/lib/lis/input";
import { MAX_FHIR_BODY_BYTES, MAX_SCORE_BODY_BYTES, MAX_SCORE_ITEMS } from "@/lib/scores/schemas";

export const metadata: Metadata = { title: "API" };

const SECTIONS = [
  ["authenticate", "Authenticate"],
  ["score-one", "Score one value"],
  ["score-batch", "Score a batch"],
  ["censored", "Censored values"],
  ["units", "Units"],
  ["fhir", "FHIR R4"],
  ["intervals", "Intervals in force"],
  ["errors", "Errors"],
  ["limits", "Limits"],
] as const;

function Section({ id, title, children }: { id: string; title: string; children: ReactNode }) {
  return (
    <section id={id} aria-labelledby={`${id}-title`} className="scroll-mt-4">
      <Panel title={<span id={`${id}-title`}>{title}</span>}>
        <div className="space-y-3 text-sm text-ink-700">{children}</div>
      </Panel>
    </section>
  );
}

function Example({ example }: { example: ApiExample }) {
  return (
    <>
      <p>{example.summary}</p>
      <CodeBlock label={`${example.title} (curl)`} code={curlCommand(example)} />
    </>
  );
}

function Code({ children }: { children: ReactNode }) {
  return <code className="rounded bg-ink-100 px-1 py-0.5 text-[0.8rem] text-ink-800">{children}</code>;
}

const ERRORS: [status: number, when: string][] = [
  [400, "The body is not valid JSON."],
  [401, "No key or session, or the key is unknown, malformed or revoked."],
  [403, "The caller may not do this: a key used outside the scoring, intervals, FHIR and analyte-reading routes, or a role that lacks the right."],
  [404, "No analyte with that code, or no such address."],
  [413, `More than ${MAX_SCORE_ITEMS.toLocaleString("en")} items, or a body larger than ${MAX_SCORE_BODY_BYTES / 1024 / 1024} MiB: refused whole.`],
  [415, "The body is not sent as application/json (application/fhir+json on the FHIR route)."],
  [422, "The envelope is invalid (no items, items not a list). A bad item in a valid batch is not a 422: it gets an error in its place."],
  [429, "The connection's rate limit is reached. Wait the Retry-After header's seconds."],
  [503, `The database cannot be reached. Nothing was changed; retry after Retry-After (${DATABASE_RETRY_AFTER_SECONDS} s).`],
];

/** How an LIS (or any program) calls Bellwether: authentication, scoring, FHIR, intervals, errors and limits. */
export default async function ApiDocsPage() {
  const caller = await requirePageCaller();
  const requestHeaders = await headers();
  const host = requestHeaders.get("host") ?? "localhost:3000";
  const proto = requestHeaders.get("x-forwarded-proto")?.split(",")[0]?.trim() ?? "http";
  const origin = `${proto}://${host}`;
  const setup = `export BELLWETHER_URL="${origin}"\nexport BELLWETHER_KEY="bwk_…"   # the LIS connection's key, shown once when it was created`;

  return (
    <>
      <PageHeader
        title="API"
        lead="How a laboratory information system (or any program) scores patient values and reads the intervals in force. Every example below can be copied and run as it stands once the two variables are set."
        actions={
          <a href="/api/v1/openapi.json" className="rounded-md border border-ink-300 bg-white px-3 py-1.5 text-sm font-medium text-ink-800 hover:bg-ink-100">
            OpenAPI 3.1 document (JSON)
          </a>
        }
      />
      <div className="grid gap-5 xl:grid-cols-[12rem_minmax(0,1fr)]">
        <nav aria-label="On this page" className="hidden xl:block">
          <ul className="sticky top-4 space-y-1 text-sm">
            {SECTIONS.map(([id, label]) => (
              <li key={id}>
                <a href={`#${id}`}>{label}</a>
              </li>
            ))}
          </ul>
        </nav>
        <div className="min-w-0 space-y-5">
          <Section id="authenticate" title="Authenticate">
            <p>
              A laboratory system sends its LIS connection&apos;s key as a bearer token: <Code>Authorization: Bearer bwk_…</Code>. An
              administrator creates the connection under{" "}
              {can(caller.role, "users:manage") ? <Link href="/admin/lis-connections">LIS connections</Link> : "LIS connections"}; the key is
              shown once, then only its first characters. Keep it where the system keeps its other secrets.
            </p>
            <p>
              A key may score values, read the analytes and read the intervals in force; anything else answers 403. An unknown, malformed or
              revoked key answers 401. Scripts run by a signed-in person may use the browser&apos;s session cookie instead.
            </p>
            <p>Set these two variables in your shell, then copy the examples:</p>
            <CodeBlock label="Shell set-up" code={setup} />
          </Section>

          <Section id="score-one" title="Score one value">
            <Example example={apiExample("score-one")} />
            <p>Each result holds:</p>
            <ul className="list-disc space-y-1 pl-5">
              <li>
                <Code>flag</Code> (<Code>L</Code>, <Code>N</Code>, <Code>H</Code>; <Code>LL</Code>/<Code>HH</Code> beyond the version&apos;s
                critical limits), <Code>z</Code> and <Code>percentile</Code> (0–100);
              </li>
              <li>
                <Code>interval</Code>: <Code>low</Code>, <Code>high</Code>, <Code>unit</Code>, the <Code>version</Code> number and{" "}
                <Code>versionId</Code>, and the <Code>partition</Code> (sex, age range) that applied;
              </li>
              <li>
                <Code>model</Code>: its kind and parameters, never reference values; <Code>hl7</Code>: <Code>obx7</Code> (reference range) and{" "}
                <Code>obx8</Code> (abnormal flag) for an OBX segment;
              </li>
              <li>
                <Code>cautions</Code>: codes, each explained once in a full sentence in the answer&apos;s <Code>cautionTexts</Code>. Show them
                with the result.
              </li>
            </ul>
          </Section>

          <Section id="score-batch" title="Score a batch">
            <Example example={apiExample("score-batch")} />
            <p>
              Results come back in the order of the items, with your <Code>ref</Code> echoed. Give <Code>sex</Code> as <Code>F</Code>/
              <Code>M</Code> or <Code>female</Code>/<Code>male</Code>; without it the version&apos;s combined partition is used if it has one,
              otherwise that item gets an error. <Code>birthDate</Code> with <Code>collectedAt</Code> gives the exact age and wins over{" "}
              <Code>ageYears</Code>. Batching is much faster than one request per value.
            </p>
          </Section>

          <Section id="censored" title="Censored values">
            <Example example={apiExample("score-censored")} />
          </Section>

          <Section id="units" title="Units">
            <Example example={apiExample("score-units")} />
            <p>
              Units are UCUM codes (<Code>mmol/L</Code>, <Code>umol/L</Code>, <Code>mg/dL</Code>, <Code>g/L</Code>, <Code>U/L</Code>,{" "}
              <Code>m[IU]/L</Code>). Without <Code>unit</Code> the value is taken in the interval&apos;s unit; a unit that cannot be converted
              gives that item an error.
            </p>
          </Section>

          <Section id="fhir" title="FHIR R4">
            <Example example={apiExample("fhir-score")} />
            <p>
              A Bundle of Observations comes back as a batch-response Bundle, each entry with its own status, in order; an Observation that
              cannot be scored carries its OperationOutcome in its entry. The Observation needs a LOINC code, a <Code>valueQuantity</Code> with
              a UCUM unit (a <Code>comparator</Code> of <Code>&lt;</Code> or <Code>&gt;</Code> marks a censored value), and, for a partition by
              sex or age, a contained Patient with <Code>gender</Code> and <Code>birthDate</Code> and the Observation&apos;s{" "}
              <Code>effectiveDateTime</Code>.
            </p>
          </Section>

          <Section id="intervals" title="Intervals in force">
            <Example example={apiExample("intervals")} />
            <p>
              <Code>version</Code> is <Code>null</Code> when nothing is in force. Each partition has its limits, their 90% confidence
              intervals, method, n, the HL7 <Code>obx7</Code> string and its FHIR <Code>referenceRange</Code> elements. Reload when a new
              version comes into force: the contact e-mail of each LIS connection is told.
            </p>
            <p>
              Children&apos;s intervals may follow continuous age curves (method <Code>lms</Code>): such a partition has no fixed limits
              (<Code>low</Code> and <Code>high</Code> are <Code>null</Code>, <Code>curves</Code> gives the ages covered). Ask for the limits at
              given ages with <Code>?ages=0.5,4,12</Code>: every partition then lists under <Code>atAges</Code> its limits at each of those
              ages it covers, each with a FHIR <Code>referenceRange</Code> whose <Code>age</Code> is that age. Scores against curves need the
              patient&apos;s exact age (<Code>birthDate</Code> and <Code>collectedAt</Code>, or <Code>ageYears</Code>) and answer the limits
              at that age in <Code>interval</Code>, with <Code>model</Code> giving L, M and S there.
            </p>
          </Section>

          <Section id="errors" title="Errors">
            <p>
              Every error is <Code>application/problem+json</Code> (RFC 9457): <Code>type</Code>, <Code>title</Code>, <Code>status</Code>, and a{" "}
              <Code>detail</Code> that says what to do next; a 422 lists each field in <Code>errors</Code>.
            </p>
            <CodeBlock label="An unknown key (401, application/problem+json)" code={readableJson(errorExamples.unknownKey)} />
            <p>In a batch, one bad item does not fail the others: it gets an error in its place.</p>
            <CodeBlock label="An item error in a batch's results" code={readableJson(errorExamples.itemError)} />
            <p>The FHIR route answers every error, authentication included, as a FHIR OperationOutcome with the same HTTP status.</p>
            <CodeBlock label="FHIR without a key (401, OperationOutcome)" code={readableJson(errorExamples.fhirUnauthenticated)} />
            <div className="overflow-x-auto">
              <table className="w-full text-left text-sm">
                <caption className="sr-only">HTTP statuses of the scoring API</caption>
                <thead className="text-xs uppercase text-ink-500">
                  <tr>
                    <th scope="col" className="py-1 pr-4">Status</th>
                    <th scope="col" className="py-1">When</th>
                  </tr>
                </thead>
                <tbody className="divide-y divide-ink-100">
                  {ERRORS.map(([status, when]) => (
                    <tr key={status}>
                      <td className="py-1.5 pr-4 font-medium tabular-nums">{status}</td>
                      <td className="py-1.5">{when}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          </Section>

          <Section id="limits" title="Limits">
            <ul className="list-disc space-y-1 pl-5">
              <li>
                At most {MAX_SCORE_ITEMS.toLocaleString("en")} items per request; {(MAX_SCORE_ITEMS + 1).toLocaleString("en")} is refused whole
                with 413.
              </li>
              <li>
                A body of at most {MAX_SCORE_BODY_BYTES / 1024 / 1024} MiB ({MAX_SCORE_BODY_BYTES.toLocaleString("en")} bytes), room for{" "}
                {MAX_SCORE_ITEMS.toLocaleString("en")} items with dates, units and references; on the FHIR route{" "}
                {MAX_FHIR_BODY_BYTES / 1024 / 1024} MiB, for as many Observations with their contained Patients.
              </li>
              <li>
                A rate limit per LIS connection, set by the administrator ({DEFAULT_RATE_PER_MINUTE.toLocaleString("en")} requests a minute
                unless changed). Past it the answer is 429 with a <Code>Retry-After</Code> header in seconds: wait that long, then send again.
                A batch counts as one request.
              </li>
              <li>
                While the database cannot be reached, values sent with an LIS key are still scored against the intervals already loaded;
                anything that needs the database (a session, the catalogue) answers 503 with <Code>Retry-After</Code>.
              </li>
            </ul>
            <p>
              The whole API, every route with its fields and answers, is in the{" "}
              <a href="/api/v1/openapi.json">OpenAPI 3.1 document</a>.
            </p>
          </Section>
        </div>
      </div>
    </>
  );
}
