/**
 * Cairn's words for the thresholds of a design and for the threshold search's results. One list, used by the
 * design form, the threshold search, packets, e-mails and the README, so a threshold is called the same thing
 * everywhere. The method papers' symbols stay as small secondary notation beside the words; JSON keys keep
 * their existing names (thetaT, futilityThreshold, efficacyThreshold, thetaS, qmax).
 * No imports, so client components can use it without pulling in the engine.
 */

type ThresholdWord = {
  /** The main label, in plain words. */
  word: string;
  /** The published notation, shown small beside the word. */
  symbol: string;
  /** One line on what the threshold does. */
  explain: string;
};

export type ThresholdKey = "thetaT" | "futilityThreshold" | "efficacyThreshold" | "thetaS" | "qmax";

/**
 * The symbol of the interim thresholds depends on the rule: predictive-probability rules use θL/θU,
 * posterior-probability rules pL/pU.
 */
export function thresholdWord(key: ThresholdKey, rule: "predictive" | "posterior" = "predictive"): ThresholdWord {
  switch (key) {
    case "thetaT":
      return {
        word: "Final success bar",
        symbol: "θT",
        explain: "At the final analysis the trial succeeds when the posterior probability of benefit exceeds this bar.",
      };
    case "futilityThreshold":
      return {
        word: "Interim futility floor",
        symbol: rule === "predictive" ? "θL" : "pL",
        explain:
          rule === "predictive"
            ? "At a look, stop for futility when the predictive probability of success falls below this floor."
            : "At a look, stop for futility when the posterior probability falls below this floor.",
      };
    case "efficacyThreshold":
      return {
        word: "Early-success bar",
        symbol: rule === "predictive" ? "θU" : "pU",
        explain: "At a look, stop early for success when the probability exceeds this bar.",
      };
    case "thetaS":
      return {
        word: "Toxicity alarm level",
        symbol: "θS",
        explain: "Raise the toxicity alarm when the posterior probability that toxicity is too high exceeds this level.",
      };
    case "qmax":
      return {
        word: "Toxicity ceiling",
        symbol: "qmax",
        explain: "The highest toxicity rate the protocol tolerates.",
      };
  }
}

/** Words for the threshold search and the operating-characteristics tables. Type I error and power are the trade's own terms. */
export const SEARCH_WORDS = {
  search: "Threshold search",
  range: "range (from, to, step)",
  typeIError: "Type I error",
  power: "Power",
  averagePatients: "Average patients",
  stopEarly: "Chance of stopping early",
  typeIErrorLimit: "Type I error limit",
  powerTarget: "Power target",
  run: "Search thresholds",
  bestDesigns: "Best designs found",
  useDesign: "Use this design",
  cloudTitle: "Type I error against power, one point per threshold set searched",
} as const;
