// `npm run bench`: runs every benchmark and prints its figures with their targets.
import { benchParse } from "./parse";
import { benchPredictions } from "./predictions";
import { benchEd } from "./ed";
import { benchEditor } from "./editor";

async function run(): Promise<void> {
  const sections: [string, () => Promise<string[]> | string[]][] = [
    ["syntax and model", benchParse],
    ["analytic predictions", benchPredictions],
    ["exact diagonalization", benchEd],
    ["editor (language server through the protocol)", benchEditor],
  ];
  // `npm run bench -- editor` runs only the sections whose name contains "editor".
  const only = process.argv.slice(2).join(" ");
  for (const [name, fn] of sections) {
    if (only && !name.includes(only)) continue;
    console.log(`# ${name}`);
    for (const line of await fn()) console.log(`  ${line}`);
  }
  const mem = process.memoryUsage();
  console.log(`# process: peak RSS now ${(mem.rss / 2 ** 20).toFixed(0)} MiB, heap used ${(mem.heapUsed / 2 ** 20).toFixed(0)} MiB`);
}

run().catch((e) => {
  console.error(e);
  process.exitCode = 1;
});
