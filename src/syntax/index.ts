export * from "./tree.js";
