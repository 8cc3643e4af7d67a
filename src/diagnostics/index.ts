export * from "./diagnostic.js";
export * from "./format.js";
export { CATALOGUE, type DiagnosticCode, type CatalogueEntry } from "./catalogue.js";
export * from "./limit.js";
