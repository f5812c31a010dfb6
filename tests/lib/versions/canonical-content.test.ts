import { describe, expect, it } from "vitest";
import canonicalize from "canonicalize";
import { canonicalContentOf, type CanonicalVersion } from "@/lib/versions/canonical-content";

// Expected values: RFC 8785 (JSON Canonicalization Scheme), June 2020, sections named beside each.
describe("the JCS serialisation (RFC 8785's own examples)", () => {
  // RFC 8785 §3.2.2 gives this input; §3.2.3 gives its canonical form (properties sorted).
  const SECTION_3_2_2_INPUT = `{
    "numbers": [333333333.33333329, 1E30, 4.50, 2e-3, 0.000000000000000000000000001],
    "string": "\\u20ac$\\u000F\\u000aA'\\u0042\\u0022\\u005c\\\\\\"\\/",
    "literals": [null, true, false]
  }`;
  const SECTION_3_2_3_OUTPUT = `{"literals":[null,true,false],"numbers":[333333333.3333333,1e+30,4.5,0.002,1e-27],"string":"€$\\u000f\\nA'B\\"\\\\\\\\\\"/"}`;

  it("writes §3.2.2's example as §3.2.3 shows it", () => {
    expect(canonicalize(JSON.parse(SECTION_3_2_2_INPUT))).toBe(SECTION_3_2_3_OUTPUT);
  });

  it("sorts properties by UTF-16 code units (§3.2.3's sorting example)", () => {
    const input = JSON.parse(`{
      "\\u20ac": "Euro Sign",
      "\\r": "Carriage Return",
      "\\ufb33": "Hebrew Letter Dalet With Dagesh",
      "1": "One",
      "\\ud83d\\ude00": "Emoji: Grinning Face",
      "\\u0080": "Control",
      "\\u00f6": "Latin Small Letter O With Diaeresis"
    }`);
    // Read the values off the text: a parsed object would move the integer-like key "1" first.
    const order = [...canonicalize(input)!.matchAll(/:"([^"]*)"/g)].map((m) => m[1]);
    // §3.2.3: "Expected Result" lists the values in this order.
    expect(order).toEqual([
      "Carriage Return",
      "One",
      "Control",
      "Latin Small Letter O With Diaeresis",
      "Euro Sign",
      "Emoji: Grinning Face",
      "Hebrew Letter Dalet With Dagesh",
    ]);
  });

  it("gives the UTF-8 bytes of §3.2.4 for §3.2.2's example", () => {
    // §3.2.4 lists these bytes in hex (line breaks removed); the same bytes come from Python:
    // python3 -c "print(open('out.json','rb').read().hex())" on §3.2.3's output saved as out.json.
    const hex =
      "7b226c69746572616c73223a5b6e756c6c2c747275652c66616c73655d2c226e756d62657273223a5b333333333333333333" +
      "2e333333333333332c31652b33302c342e352c302e3030322c31652d32375d2c22737472696e67223a22e282ac245c7530" +
      "3030665c6e4127425c225c5c5c5c5c222f227d";
    expect(Buffer.from(canonicalize(JSON.parse(SECTION_3_2_2_INPUT))!, "utf8").toString("hex")).toBe(hex);
  });

  it("writes numbers as Appendix B's table says", () => {
    // RFC 8785 Appendix B: IEEE 754 bit patterns and their JSON form.
    const cases: [string, string][] = [
      ["0000000000000000", "0"],
      ["8000000000000000", "0"],
      ["0000000000000001", "5e-324"],
      ["8000000000000001", "-5e-324"],
      ["7fefffffffffffff", "1.7976931348623157e+308"],
      ["4340000000000000", "9007199254740992"],
      ["c340000000000000", "-9007199254740992"],
      ["4430000000000000", "295147905179352830000"],
      ["44b52d02c7e14af5", "9.999999999999997e+22"],
      ["44b52d02c7e14af6", "1e+23"],
      ["44b52d02c7e14af7", "1.0000000000000001e+23"],
      ["444b1ae4d6e2ef4e", "999999999999999700000"],
      ["444b1ae4d6e2ef4f", "999999999999999900000"],
      ["444b1ae4d6e2ef50", "1e+21"],
      ["3eb0c6f7a0b5ed8c", "9.999999999999997e-7"],
      ["3eb0c6f7a0b5ed8d", "0.000001"],
      ["41b3de4355555553", "333333333.3333332"],
      ["41b3de4355555554", "333333333.33333325"],
      ["41b3de4355555555", "333333333.3333333"],
      ["41b3de4355555556", "333333333.3333334"],
      ["41b3de4355555557", "333333333.33333343"],
      ["becbf647612f3696", "-0.0000033333333333333333"],
      ["43143ff3c1cb0959", "1424953923781206.2"],
    ];
    for (const [bits, json] of cases) {
      const value = Buffer.from(bits, "hex").readDoubleBE(0);
      expect(canonicalize(value), bits).toBe(json);
    }
    // Appendix B: NaN and Infinity have no JSON form and must be refused.
    expect(() => canonicalize(Number.NaN)).toThrow("NaN is not allowed");
    expect(() => canonicalize(Number.POSITIVE_INFINITY)).toThrow("Infinity is not allowed");
  });
});

describe("canonicalContentOf", () => {
  const version: CanonicalVersion = {
    analyte: { code: "GLU", unit: "mmol/L" },
    number: 2,
    criticalLow: 2.5,
    criticalHigh: 25,
    partitions: [
      {
        position: 2, sex: "M", ageFromDays: null, ageToDays: null, low: 3.9, high: 6.1,
        lowCi: [3.8, 4], highCi: [5.9, 6.3], method: "parametric", n: 120,
        model: { kind: "gaussian", transform: "ln", mean: 1.6, sd: 0.1 },
      },
      {
        position: 1, sex: "F", ageFromDays: 6575, ageToDays: null, low: 3.8, high: 6,
        lowCi: null, highCi: null, method: "nonparametric", n: 3,
        model: { kind: "empirical", values: [3.8, 4.5, 6] },
      },
    ],
    uploadSha256: ["bb".repeat(32), "aa".repeat(32), "bb".repeat(32)],
  };

  // Written by hand from the rules: keys sorted, partitions by position, hashes sorted and unique.
  const EXPECTED =
    '{"analyte":{"code":"GLU","unit":"mmol/L"},"criticalHigh":25,"criticalLow":2.5,"format":"bellwether.interval-version.v1","number":2,' +
    '"partitions":[{"ageFromDays":6575,"ageToDays":null,"high":6,"highCi":null,"low":3.8,"lowCi":null,"method":"nonparametric",' +
    '"model":{"kind":"empirical","values":[3.8,4.5,6]},"n":3,"position":1,"sex":"F"},' +
    '{"ageFromDays":null,"ageToDays":null,"high":6.1,"highCi":[5.9,6.3],"low":3.9,"lowCi":[3.8,4],"method":"parametric",' +
    '"model":{"kind":"gaussian","mean":1.6,"sd":0.1,"transform":"ln"},"n":120,"position":2,"sex":"M"}],' +
    `"uploadSha256":["${"aa".repeat(32)}","${"bb".repeat(32)}"]}`;

  it("writes the version in JCS form", () => {
    expect(canonicalContentOf(version).text).toBe(EXPECTED);
  });

  it("hashes the text's UTF-8 bytes with SHA-256 as sha256sum does", () => {
    // printf '%s' '<EXPECTED above>' | sha256sum   (GNU coreutils 9.1)
    expect(canonicalContentOf(version).sha256).toBe("22b791972f2834d3a1997117eac823199bb6089e206cd48ba11935f58c114e4f");
  });

  it("gives the same text whatever the order of the partitions and upload hashes", () => {
    const reordered = { ...version, partitions: [...version.partitions].reverse(), uploadSha256: [...version.uploadSha256].reverse() };
    expect(canonicalContentOf(reordered)).toEqual(canonicalContentOf(version));
  });

  it("changes the hash when one limit changes", () => {
    const changed = { ...version, partitions: [{ ...version.partitions[0], high: 6.2 }, version.partitions[1]] };
    expect(canonicalContentOf(changed).sha256).not.toBe(canonicalContentOf(version).sha256);
  });
});
