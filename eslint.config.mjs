import nextVitals from "eslint-config-next/core-web-vitals";
import nextTypescript from "eslint-config-next/typescript";

const config = [
  ...nextVitals,
  ...nextTypescript,
  {
    ignores: [".next/**", ".cli-build/**", "node_modules/**", ".data/**", ".test-data/**", ".bench-data/**", "next-env.d.ts", "drizzle/**"],
  },
  {
    // The command line's launcher is plain CommonJS that node runs without compiling.
    files: ["scripts/cli/launch.cjs"],
    rules: { "@typescript-eslint/no-require-imports": "off" },
  },
  {
    rules: {
      // The table shell is generic over column value types, as TanStack Table's own types are.
      "@typescript-eslint/no-explicit-any": ["error", { ignoreRestArgs: true }],
    },
  },
  // The arrows of the contributor guide: app → components/lib/db; components never import app
  // or db (pages pass data and server actions in as props); db never imports app or
  // components; lib never imports app or components; lib/stats imports nothing of ours.
  {
    files: ["components/**/*.{ts,tsx}"],
    rules: {
      "no-restricted-imports": ["error", { patterns: [
        { group: ["@/app", "@/app/**", "**/app/**"], message: "Components do not import from app/: the page passes server actions and data in as props." },
        { group: ["@/db", "@/db/**", "**/db/**"], message: "Components do not import the database: the page loads data and passes plain props." },
      ] }],
    },
  },
  {
    files: ["db/**/*.ts"],
    rules: {
      "no-restricted-imports": ["error", { patterns: [
        { group: ["@/app", "@/app/**", "@/components", "@/components/**"], message: "db/ never imports app/ or components/." },
      ] }],
    },
  },
  {
    files: ["lib/**/*.{ts,tsx}"],
    ignores: ["lib/stats/**"],
    rules: {
      "no-restricted-imports": ["error", { patterns: [
        { group: ["@/app", "@/app/**", "@/components", "@/components/**"], message: "lib/ never imports app/ or components/." },
      ] }],
    },
  },
  {
    files: ["lib/stats/**/*.ts"],
    rules: {
      "no-restricted-imports": ["error", { patterns: [
        { group: ["@/*", "@/**", "../*", "../**"], message: "lib/stats is pure: it imports only its own files (./…) and general-purpose packages." },
      ] }],
    },
  },
  {
    files: ["components/ui/data-table.tsx"],
    rules: { "@typescript-eslint/no-explicit-any": "off" },
  },
];

export default config;
