import nextVitals from "eslint-config-next/core-web-vitals";
import nextTypescript from "eslint-config-next/typescript";
import prettier from "eslint-config-prettier";

const config = [
  {
    ignores: [
      "node_modules/**",
      ".next/**",
      ".data/**",
      ".test-data/**",
      "drizzle/**",
      ".stryker-tmp/**",
      "reports/**",
      "next-env.d.ts",
    ],
  },
  ...nextVitals,
  ...nextTypescript,
  prettier,
];

export default config;
