import nextVitals from "eslint-config-next/core-web-vitals";
import nextTypescript from "eslint-config-next/typescript";

const config = [
  ...nextVitals,
  ...nextTypescript,
  {
    ignores: [".next/**", "node_modules/**", ".data/**", ".test-data/**", "next-env.d.ts", "drizzle/**"],
  },
  {
    rules: {
      // The table shell is generic over column value types, as TanStack Table's own types are.
      "@typescript-eslint/no-explicit-any": ["error", { ignoreRestArgs: true }],
    },
  },
  {
    files: ["components/ui/data-table.tsx"],
    rules: { "@typescript-eslint/no-explicit-any": "off" },
  },
];

export default config;
