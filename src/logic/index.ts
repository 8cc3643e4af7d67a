export * from "./graph.js";
export { buildLogicGraph } from "./build.js";
export { analyzeLoops, evaluationOrder, stronglyConnected, type LoopAnalysis } from "./loops.js";
export { StepSimulator, simulateWords, enumerationWords, seededRandom, type Tri, type StepResult } from "./evaluate.js";
export { checkEquivalence, truthTable, type EquivalenceResult, type ConeCheck, type Counterexample } from "./equivalence.js";
export { nearestName, editDistance } from "./names.js";
