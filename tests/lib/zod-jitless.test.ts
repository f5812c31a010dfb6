import { execFileSync } from "node:child_process";
import path from "node:path";
import { describe, expect, it } from "vitest";

/**
 * app/layout.tsx sets `globalThis.__zod_globalConfig = {jitless: true}` in the browser before any
 * bundle runs, so that zod never probes `new Function` under the content security policy. This
 * holds the installed zod to reading its settings from there (a fresh process, as a page is).
 */
describe("zod's settings from globalThis", () => {
  it("an object schema made after the flag is set never calls Function", () => {
    const script = `
      globalThis.__zod_globalConfig = Object.assign(globalThis.__zod_globalConfig || {}, { jitless: true });
      let calls = 0;
      const RealFunction = globalThis.Function;
      globalThis.Function = new Proxy(RealFunction, { apply(t, self, args) { calls++; return Reflect.apply(t, self, args); }, construct(t, args) { calls++; return Reflect.construct(t, args); } });
      const { z } = require("zod");
      const schema = z.object({ a: z.number(), b: z.string() });
      for (let i = 0; i < 3; i++) schema.parse({ a: i, b: "x" });
      console.log(JSON.stringify({ jitless: z.config().jitless, calls }));
    `;
    const out = execFileSync(process.execPath, ["-e", script], { cwd: path.resolve(__dirname, "..", ".."), encoding: "utf8" });
    expect(JSON.parse(out)).toEqual({ jitless: true, calls: 0 });
  });

  it("without the flag zod does probe (so the test above can fail)", () => {
    const script = `
      let calls = 0;
      const RealFunction = globalThis.Function;
      globalThis.Function = new Proxy(RealFunction, { apply(t, self, args) { calls++; return Reflect.apply(t, self, args); }, construct(t, args) { calls++; return Reflect.construct(t, args); } });
      const { z } = require("zod");
      const schema = z.object({ a: z.number(), b: z.string() });
      for (let i = 0; i < 3; i++) schema.parse({ a: i, b: "x" });
      console.log(JSON.stringify({ calls }));
    `;
    const out = execFileSync(process.execPath, ["-e", script], { cwd: path.resolve(__dirname, "..", ".."), encoding: "utf8" });
    expect(JSON.parse(out).calls).toBeGreaterThan(0);
  });
});
