export * from "./graph.js";
export { buildLogicGraph } from "./build.js";
export { analyzeLoops, evaluationOrder, stronglyConnected, type LoopAnalysis } from "./loops.js";
export { StepSimulator, simulateWords, enumerationWords, seededRandom, type Tri, type StepResult } from "./evaluate.js";
export { checkEquivalence, partialCheckText, MAX_EXHAUSTIVE_WORK, truthTable, type EquivalenceOptions, type EquivalenceResult, type ConeCheck, type Counterexample } from "./equivalence.js";
export { nearestName, editDistance } from "./names.js";
export { dontCareUse, usableDontCares, dontCareWords, isDontCarePoint, dontCareMask, type DontCareUse } from "./dontcares.js";
export { analyzeFeedback, type FeedbackAnalysis, type LoopInfo, type LoopStability } from "./feedback.js";
export { findStaticHazards, termText, type StaticHazard, type HazardReport } from "./hazards.js";
