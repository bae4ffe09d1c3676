import type { Config } from "tailwindcss";
import { palette } from "./src/lib/palette";

export default {
  content: ["./index.html", "./src/**/*.{ts,tsx}"],
  theme: {
    extend: {
      colors: {
        ink: palette.ink,
        slate: palette.slate,
        paper: palette.paper,
        card: palette.card,
        line: palette.line,
        muted: palette.muted,
        accent: palette.accent,
        "accent-soft": palette.accentSoft,
        ochre: palette.ochre,
        alert: palette.alert,
        ok: palette.ok,
      },
      fontFamily: {
        sans: ['"Inter Tight"', "system-ui", "sans-serif"],
      },
    },
  },
} satisfies Config;
