// The tool's name and version, as the generated files state them.
import { createRequire } from "node:module";

const require = createRequire(import.meta.url);
const pkg = require("../../package.json") as { name: string; version: string };

export const TOOL = { name: pkg.name, version: pkg.version } as const;
