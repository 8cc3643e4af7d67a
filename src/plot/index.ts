export * from "./svg.js";
export * from "./scale.js";
