import type { Config } from "tailwindcss";

// Partita's own palette: warm paper, deep ink, and three signal colours that the report uses
// consistently (cadmium for warnings and skew, verdigris for local updates, indigo for minibatches).
const config: Config = {
  content: ["./app/**/*.{ts,tsx}", "./components/**/*.{ts,tsx}"],
  theme: {
    extend: {
      colors: {
        paper: { DEFAULT: "#f6f4ee", deep: "#ece8dc" },
        ink: { DEFAULT: "#1c2230", soft: "#4a5266", faint: "#8a90a0" },
        cadmium: { DEFAULT: "#d9652b", soft: "#f6dccb" },
        verdigris: { DEFAULT: "#2f8f83", soft: "#d3ece8" },
        indigo: { DEFAULT: "#3d4a9e", soft: "#dcdff3" },
      },
      fontFamily: {
        sans: ["var(--font-inter)", "system-ui", "sans-serif"],
      },
    },
  },
};

export default config;
