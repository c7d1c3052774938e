/**
 * `npm run demo:files -- [FOLDER]` writes the invented orchard demo's three CSV files (the dataset,
 * the by-orchard partition map and the shuffled one) into FOLDER (default `examples/`), so the
 * README's command-line and API examples run on files anyone can make. Same bytes on every machine.
 */
import { mkdirSync, writeFileSync } from "node:fs";
import path from "node:path";
import { generateOrchardDemo } from "../lib/demo/orchards";

const folder = path.resolve(process.argv[2] ?? "examples");
mkdirSync(folder, { recursive: true });
const demo = generateOrchardDemo();
const files = {
  "orchards.csv": demo.dataset,
  "by-orchard.csv": demo.byOrchard,
  "shuffled.csv": demo.shuffled,
};
for (const [name, content] of Object.entries(files)) {
  writeFileSync(path.join(folder, name), content);
  process.stdout.write(`${path.join(folder, name)}\n`);
}
