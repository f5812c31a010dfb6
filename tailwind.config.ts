import type { Config } from "tailwindcss";

// Bellwether's palette: deep "ink" for structure, "bronze" (bell metal) for the brand accent,
// "tide" for actions, and plain signal colours for states. Read by app/globals.css via @config.
const config: Config = {
  content: ["./app/**/*.{ts,tsx}", "./components/**/*.{ts,tsx}"],
  theme: {
    extend: {
      colors: {
        ink: {
          50: "#f3f5f7",
          100: "#e4e8ec",
          200: "#c9d1d9",
          300: "#a3b0bd",
          400: "#73838f",
          500: "#556572",
          600: "#3f4d59",
          700: "#2e3a45",
          800: "#1f2931",
          900: "#141b21",
        },
        bronze: {
          50: "#fbf6ee",
          100: "#f4e8d2",
          300: "#dcb478",
          500: "#b9853a",
          600: "#9c6c2a",
          700: "#7b5321",
        },
        tide: {
          50: "#eef7f7",
          100: "#d5ecec",
          500: "#1f7a7a",
          600: "#176464",
          700: "#114f4f",
        },
        signal: {
          low: "#2f5fa8",
          high: "#b03a2e",
          ok: "#2f7d4a",
          warn: "#a86a12",
        },
      },
      fontFamily: {
        sans: ["var(--font-plex)", "system-ui", "sans-serif"],
      },
    },
  },
};

export default config;
