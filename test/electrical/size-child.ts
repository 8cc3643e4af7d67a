// Sizes one of the test netlists in a child process and prints the result as JSON: the fast
// variants' search under a speed budget runs for minutes, longer than a test worker may block.
// Usage: tsx test/electrical/size-child.ts <fanout-loads> '<SizingOptions JSON>'
import { sizeDesign } from "../../src/electrical/size.js";
import { fanoutNet } from "./fixtures.js";

const loads = Number(process.argv[2]);
const options = JSON.parse(process.argv[3] ?? "{}");
const r = sizeDesign(fanoutNet(loads), options);
process.stdout.write(JSON.stringify({ design: r.value, diagnostics: r.diagnostics }));
