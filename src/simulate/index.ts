export * from "./engine.js";
export * from "./waveform.js";
export { parseRawFile, type RawFile, type RawPlot, type RawVariable } from "./raw.js";
export { classifyMessages, parseMeasures, type EngineMessages } from "./messages.js";
