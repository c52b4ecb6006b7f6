/**
 * Names of the monitoring and safety rules as shown on screens and in packets. No imports, so client
 * components can use them without pulling in the engine.
 */
import type { MonitoringRule, SafetyRule } from "./types";

/** The rule's name as shown to a statistician. Only the uncertain-standard form carries the paper's name. */
export function monitoringRuleLabel(kind: MonitoringRule["kind"], arms: "single" | "two"): string {
  if (kind === "predictive") return "Predictive probability of success (Lee & Liu 2008)";
  if (kind === "posterior")
    return arms === "single" ? "Posterior probability against a fixed rate" : "Posterior probability of the difference against the control arm";
  return arms === "single"
    ? "Posterior probability against an uncertain standard rate (Thall & Simon 1994)"
    : "Posterior probability against the control arm as the uncertain standard (Thall & Simon 1994)";
}

/** The safety rule's name as shown to a statistician. */
export function safetyRuleLabel(safety: SafetyRule): string {
  return safety.kind === "uncertainStandard"
    ? "Against an uncertain standard toxicity rate plus a margin (Thall, Simon & Estey 1995)"
    : "Against a fixed toxicity limit";
}
