// Sequential logic: built-in state elements (dff, dlatch) and their expansion into NAND gates,
// the analysis of what a design stores (loops, initial values, clock), the initial state, the
// testbench plan and the state elements' timing with the clock limit.
export { STATE_ELEMENT_SIGNATURES, ELEMENT_STRUCTURES, elementSignature, type StateElementKind, type ElementStructure, type DelayArc } from "./elements.js";
export { expandStateElements, type StateElement, type Expansion, type PinSource } from "./expand.js";
export { analyzeState, type StateAnalysis } from "./state.js";
export { analyzeClocking, type Clocking } from "./clocking.js";
export { initialState, type InitialState, type InitialOptions } from "./initial.js";
export { estimateSequentialTiming, clockedStepSeconds, type SequentialTiming, type ElementTiming, type RegisterPath } from "./timing.js";
export { checkFeedbackHazards, planTestbench, type TestbenchPlan, type PlanOptions } from "./plan.js";
export { stateView, stateSummaryText, stateJson, type StateView } from "./report-view.js";
