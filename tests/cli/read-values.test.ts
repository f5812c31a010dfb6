import { describe, expect, it } from "vitest";
import { readValues, readValuesWithPapa, scanValues } from "@/scripts/cli/read-values";
import { CliError } from "@/scripts/cli/cli-error";
import { createRandom } from "@/lib/stats/random";

// The reference for every expectation here is Papa Parse (readValuesWithPapa: the reader the
// command line used before the fast scan, and still the one that has the last word), plus a
// few files whose values are written out by hand below.

type Outcome = { values: number[] } | { error: string };

function outcome(f: () => number[]): Outcome {
  try {
    return { values: f() };
  } catch (e) {
    if (e instanceof CliError) return { error: e.message };
    throw e;
  }
}

/** Same numbers, -0 and 0 told apart (Object.is), as Number() would give them. */
function sameValues(a: number[], b: number[]): boolean {
  return a.length === b.length && a.every((v, i) => Object.is(v, b[i]));
}

describe("the fast CSV scan", () => {
  it("reads the everyday shapes itself, with the values written in the file", () => {
    // Each file's values, read off the text by hand.
    const cases: [string, string, number[]][] = [
      ["plain", "donor,value\nA,4.1\nB,3.9\n", [4.1, 3.9]],
      ["CRLF, no final line ending", "donor,value\r\nA,4.1\r\nB,3.9", [4.1, 3.9]],
      ["CR only", "value\r4.1\r3.9\r", [4.1, 3.9]],
      // Two CRs, one followed by LF: fewer than half of (CRs + 1), so Papa splits at CR and the
      // LF is white space before 1.
      ["mixed endings, CR by majority", "value\r\n1\r2", [1, 2]],
      ["semicolons, value first, other case", "Value;donor\n4.1;A\n-0.5;B\n", [4.1, -0.5]],
      ["tabs and spaces", " value \tdonor\n 4.1 \tA\n1e3\tB\n", [4.1, 1000]],
      ["quoted fields", 'donor,value,note\n"Smith, J","4.1","said ""hi"""\nB,.5,\n', [4.1, 0.5]],
      ["blank and white-space lines", "donor,value\n\nA,4.1\n  \n , \nB,3.9\n\n", [4.1, 3.9]],
      ["ragged rows", "donor,value\nA,4.1,extra,more\nB,3.9\n", [4.1, 3.9]],
      ["one column", "value\n4.1\n3.9\n", [4.1, 3.9]],
      ["hex and long digits, read as Number reads them", "value\n0x1A\n0.12345678901234567890\n1e-30\n", [26, 0.1234567890123456789, 1e-30]],
    ];
    for (const [label, text, expected] of cases) {
      const fast = scanValues(text);
      expect(fast, label).not.toBeNull();
      expect(sameValues(fast!, expected), `${label}: ${fast}`).toBe(true);
      expect(sameValues(readValuesWithPapa(text, "f.csv"), expected), label).toBe(true);
    }
  });

  it("strips a byte-order mark", () => {
    expect(readValues("\uFEFFvalue\n4.1\n", "f.csv")).toEqual([4.1]);
  });

  it("leaves every error to Papa, with the same message as before", () => {
    const bad: [string, string][] = [
      ["donor,value\nA,4.1\nB,\nC,3.9\n", 'f.csv line 3: value "" is not a number'],
      ["donor,value\nA,4.1\n\nB,<0.5\n", 'f.csv line 4: value "<0.5" is not a number'],
      ["donor,result\nA,4.1\n", 'f.csv has no "value" column (columns: donor, result)'],
      ["  \n", "f.csv is empty"],
      ["value\n", "f.csv has a header but no values"],
      ["value\nInfinity\n", 'f.csv line 2: value "Infinity" is not a number'],
      ['donor,value\n"A,4.1\n', "f.csv: CSV error near data row 2: Quoted field unterminated"],
    ];
    for (const [text, message] of bad) {
      expect(scanValues(text), text).toBeNull();
      expect(() => readValues(text, "f.csv")).toThrow(new CliError(message));
    }
  });

  it("agrees with Papa Parse on 3000 seeded random files", () => {
    const rng = createRandom(20261202);
    const pick = <T,>(xs: readonly T[]): T => xs[rng.nextInt(xs.length)];
    const numbers = [
      "4.1", "3.9", "-0", "0", ".5", "5.", "+3", " 4.2 ", "1e3", "2E-4", "0x1A", "12345678901234567",
      "0.1234567890123456789", "1e-30", "7e22", "123.456e-20", "", " ", "abc", "Infinity", "1_0", "4,1",
      "<0.5", ">1000", "9007199254740993", "1.7976931348623157e308", "1e400", "00012.50",
    ];
    let fast = 0;
    for (let file = 0; file < 3000; file++) {
      const delimiter = pick([",", ";", "\t", "|"]);
      const newline = pick(["\n", "\r\n", "\r", "\n"]);
      const columns = 1 + rng.nextInt(4);
      const at = rng.nextInt(columns);
      const header = Array.from({ length: columns }, (_, c) =>
        c === at ? pick(["value", " Value ", "VALUE", "value", "val"]) : `${pick(["donor", "sex", "note", ""])}${c}`,
      );
      const quote = (t: string) => `"${t.replaceAll('"', '""')}"`;
      // Now and then a duplicated name (Papa renames it) or a quoted one.
      if (columns > 1 && rng.nextInt(10) === 0) header[(at + 1) % columns] = header[at];
      const rows: string[] = [header.map((h) => (rng.nextInt(20) === 0 ? quote(h) : h)).join(delimiter)];
      const nRows = rng.nextInt(30);
      // A quarter of the files carry odd values, the rest only well-formed numbers.
      const dirty = rng.nextInt(4) === 0;
      for (let r = 0; r < nRows; r++) {
        const kind = rng.nextInt(40);
        if (kind === 0) rows.push("");
        else if (kind === 1) rows.push(pick(["  ", delimiter, ` ${delimiter} `]));
        else {
          const good = !dirty || rng.nextInt(8) !== 0;
          const width = rng.nextInt(12) === 0 ? rng.nextInt(columns + 2) : columns;
          const cells = Array.from({ length: width }, (_, c) => {
            if (c === at) {
              const v = good ? String(Math.round(rng.nextUint32() / 4e5) / 100) : pick(numbers);
              return rng.nextInt(6) === 0 ? quote(v) : v;
            }
            const t = pick(["A", "B C", `x${delimiter}y`, 'say "hi"', "", "D1"]);
            return t.includes(delimiter) || t.includes('"') || rng.nextInt(5) === 0 ? quote(t) : t;
          });
          let line = cells.join(delimiter);
          if (dirty && rng.nextInt(40) === 0) line += '"'; // a stray quote
          rows.push(line);
        }
      }
      // One file in ten mixes its line endings, which Papa settles by majority.
      const mixed = rng.nextInt(10) === 0;
      let text = rows.map((row, r) => (r === 0 ? row : (mixed ? pick(["\n", "\r\n", "\r"]) : newline) + row)).join("");
      if (rng.nextInt(2) === 0) text += newline;
      if (rng.nextInt(10) === 0) text = "\uFEFF" + text;
      const body = text.replace(/^\uFEFF/, "");
      const expected = outcome(() => readValuesWithPapa(body, "f.csv"));
      const scanned = scanValues(body);
      if (scanned !== null) {
        fast++;
        expect("values" in expected && sameValues(scanned, expected.values), JSON.stringify(text)).toBe(true);
      }
      const got = outcome(() => readValues(text, "f.csv"));
      if ("error" in expected) expect(got, JSON.stringify(text)).toEqual(expected);
      else expect("values" in got && sameValues(got.values, expected.values), JSON.stringify(text)).toBe(true);
    }
    // Most generated files are ordinary; the scan must have read a good share of them itself.
    expect(fast).toBeGreaterThan(1000);
  });

  it("reads a file over a megabyte itself when its first lines hold no quotes", () => {
    const lines = ["donor,sex,value"];
    for (let i = 0; i < 120_000; i++) lines.push(`D${i},${i % 2 ? "F" : "M"},${(i % 997) / 10}`);
    lines.push('"Smith, J",F,"4.5"');
    const text = lines.join("\r\n") + "\r\n";
    expect(text.length).toBeGreaterThan(1024 * 1024);
    const scanned = scanValues(text);
    expect(scanned).not.toBeNull();
    expect(sameValues(scanned!, readValuesWithPapa(text, "f.csv"))).toBe(true);
    // Quotes in the first lines: Papa reads the whole file, with the same answer.
    const quoted = `"donor","sex","value"\r\n${lines.slice(1).join("\r\n")}`;
    expect(scanValues(quoted)).toBeNull();
    expect(sameValues(readValues(quoted, "f.csv"), readValuesWithPapa(quoted, "f.csv"))).toBe(true);
  });
});
