#!/usr/bin/env node
// The gatewright command.
import { hideBin } from "yargs/helpers";
import { main } from "./main.js";

main(hideBin(process.argv)).then(
  (code) => {
    process.exitCode = code;
  },
  (e: unknown) => {
    process.stderr.write(`gatewright: internal error: ${(e as Error).message}\n`);
    process.exitCode = 1;
  },
);
