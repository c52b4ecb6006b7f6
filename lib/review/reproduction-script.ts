/**
 * CLOSED: the reproduction script of one locked look. A plain R program (base R only: pbeta, qbeta,
 * dbeta, lbeta, lchoose, integrate, uniroot) that recomputes, from the stored counts and the locked
 * design written into it, the numbers the closed review reports at this look, and prints each next
 * to Cairn's value with the absolute difference. Pure: the caller passes the review it computed.
 *
 * The R code follows the definitions, not Cairn's algorithms: the two-arm probability is R's own
 * adaptive quadrature (integrate) of f_C(y) S_T(y + delta); the beta-binomial predictive mass is
 * written with lbeta and lchoose and summed over every future outcome; boundaries are read count by
 * count from the same statistics. Only the strict-threshold rule (a value within 1e-9 of its
 * threshold is a tie, lib/stats/compare.ts) is copied, because it is part of the rule itself.
 */
import type { Design, LookDecision, MixtureBeta, PriorSpec, SafetyRule } from "@/lib/stats/types";
import { resolvePrior } from "@/lib/stats/priors";
import { TIE_TOLERANCE } from "@/lib/stats/compare";
import { ENGINE_VERSION } from "@/lib/stats/version";
import { StatsDomainError } from "@/lib/stats/validate";
import type { Review, ReviewInput } from "./compute-review";

/** The first line of every reproduction script (the browser test checks the download starts with it). */
export const REPRODUCTION_SCRIPT_HEADER = "# Cairn reproduction script (base R) - CLOSED: arm-level interim results";

/** Differences above this fail the comparison the script prints (and the test command's check). */
export const REPRODUCTION_TOLERANCE = 1e-8;

type ReproductionScriptArgs = {
  trialCode: string;
  input: ReviewInput;
  review: Review;
  reviewVersion?: number | null;
};

/** A JavaScript number as an R literal that reads back to the same double (shortest round-trip form). */
function num(v: number): string {
  if (!Number.isFinite(v)) throw new StatsDomainError("value", v, "must be finite to be written into the script");
  return String(v);
}

function optNum(v: number | null | undefined): string {
  return v === null || v === undefined ? "NA" : num(v);
}

function rString(s: string): string {
  return JSON.stringify(s);
}

function mixture(m: MixtureBeta): string {
  return `list(w = c(${m.map((c) => num(c.weight)).join(", ")}), a = c(${m.map((c) => num(c.a)).join(", ")}), b = c(${m.map((c) => num(c.b)).join(", ")}))`;
}

function priorLine(name: string, spec: PriorSpec): string {
  return `${name} <- ${mixture(resolvePrior(spec))}  # ${JSON.stringify(spec)}`;
}

/** The decision as one word, the same vocabulary the R code prints. */
export function decisionWord(d: LookDecision): string {
  if (d.action === "continue") return "continue";
  if (d.action === "stop") return `stop_for_${d.stop}`;
  return d.success ? "final_success" : "final_no_success";
}

function safetyLines(rule: SafetyRule | null): string[] {
  if (!rule) return ["safety <- NULL"];
  const prior = mixture(resolvePrior(rule.prior));
  if (rule.kind === "uncertainStandard")
    return [`safety <- list(kind = "uncertainStandard", prior = ${prior}, standard = list(w = 1, a = ${num(rule.standard.a)}, b = ${num(rule.standard.b)}), margin = ${num(rule.margin)}, thetaS = ${num(rule.thetaS)})`];
  return [`safety <- list(kind = "fixedLimit", prior = ${prior}, qmax = ${num(rule.qmax)}, thetaS = ${num(rule.thetaS)})`];
}

function designLines(design: Design): string[] {
  const r = design.rule;
  const rule = `rule <- list(kind = ${rString(r.kind)}, thetaT = ${num(r.thetaT)}, thetaL = ${num(r.futilityThreshold)}, efficacy = ${r.efficacyStopping && r.efficacyThreshold !== null ? "TRUE" : "FALSE"}, thetaU = ${optNum(r.efficacyThreshold)})`;
  if (design.arms === "single") {
    const lines = [
      `arms <- "single"`,
      priorLine("prior", design.prior),
      `p0 <- ${num(design.p0)}`,
      `delta <- ${num(design.delta)}`,
      `nMax <- ${design.nMax}`,
      rule,
    ];
    if (r.kind === "uncertainStandard" && r.standard) lines.push(`standard <- list(w = 1, a = ${num(r.standard.a)}, b = ${num(r.standard.b)})`);
    return [...lines, ...safetyLines(design.safety)];
  }
  return [
    `arms <- "two"`,
    priorLine("priorT", design.priorT),
    priorLine("priorC", design.priorC),
    `delta <- ${num(design.delta)}`,
    `nMax <- ${design.nMaxPerArm}  # per arm`,
    rule,
    ...safetyLines(design.safety),
  ];
}

type Check = { name: string; cairn: string; kind: "num" | "count" | "word" };

/** Cairn's values at this look, as R expressions the script compares with its own. */
function checks(review: Review): Check[] {
  const out: Check[] = [];
  const n = (name: string, v: number | null | undefined) => {
    if (v !== null && v !== undefined) out.push({ name, cairn: num(v), kind: "num" });
  };
  const count = (name: string, v: number | null) => out.push({ name, cairn: v === null ? "NA" : String(v), kind: "count" });
  for (const arm of review.arms) {
    const p = arm.role;
    n(`${p}.posterior_mean`, arm.summary.mean);
    n(`${p}.posterior_sd`, arm.summary.sd);
    n(`${p}.posterior_median`, arm.summary.median);
    n(`${p}.credible_lower`, arm.summary.equalTailed.lower);
    n(`${p}.credible_upper`, arm.summary.equalTailed.upper);
    if (arm.probAboveP0 !== null) n(`${p}.prob_above_p0`, arm.probAboveP0);
    n(`${p}.clopper_pearson_lower`, arm.clopperPearson.lower);
    n(`${p}.clopper_pearson_upper`, arm.clopperPearson.upper);
  }
  if (review.difference) n("two_arm.prob_difference_exceeds_delta", review.difference.probExceeds);
  const ev = review.current.evaluation;
  n("look.prob_success_rule_now", ev.posteriorProbabilitySuccess);
  n("look.predictive_probability", ev.predictiveProbability);
  n("look.monitoring_probability", ev.posteriorProbabilityMonitoring);
  n("look.safety_probability", ev.safetyProbability);
  out.push({ name: "look.decision", cairn: rString(decisionWord(review.decision)), kind: "word" });
  const obs = review.observedBoundaries[review.observedBoundaries.length - 1];
  if (obs) {
    count("boundary.at_observed_n.futility_max", obs.futilityMax);
    count("boundary.at_observed_n.efficacy_min", obs.efficacyMin);
    if (obs.planned) {
      count("boundary.at_planned_n.futility_max", obs.planned.futilityMax);
      count("boundary.at_planned_n.efficacy_min", obs.planned.efficacyMin);
    }
  }
  if (review.safety) {
    n("safety.posterior_mean", review.safety.summary.mean);
    const s = review.safety.observed[review.safety.observed.length - 1];
    if (s) {
      count("safety.boundary.at_observed_n.toxicity_min", s.toxicityMin);
      if (s.planned) count("safety.boundary.at_planned_n.toxicity_min", s.planned.toxicityMin);
    }
  }
  return out;
}

/**
 * The R script for one locked look.
 * @throws StatsDomainError when the review and its inputs do not belong together.
 */
export function reproductionScript({ trialCode, input, review, reviewVersion }: ReproductionScriptArgs): string {
  const design = input.design;
  const looks = input.looks.filter((l) => l.lookNumber <= review.lookNumber).sort((a, b) => a.lookNumber - b.lookNumber);
  if (looks.length === 0 || looks[looks.length - 1].analysisId !== review.analysisId)
    throw new StatsDomainError("looks", looks.length, "must end with the look under review");
  const roleOf = new Map(input.arms.map((a) => [a.id, a.role]));
  const rows: string[] = [];
  for (const l of looks)
    for (const c of [...l.counts].sort((a, b) => a.armId - b.armId)) {
      const role = roleOf.get(c.armId);
      if (!role) continue;
      rows.push(`  ${l.lookNumber}, ${rString(role)}, ${optNum(l.plannedN ?? null)}, ${c.evaluable}, ${c.responders}, ${optNum(c.treated)}, ${optNum(c.toxicities)}`);
    }
  const list = checks(review);
  const checkRows = list.map((c) => `  list(${rString(c.name)}, ${c.cairn}, ${rString(c.kind)})`);
  const header = [
    REPRODUCTION_SCRIPT_HEADER,
    `# Trial ${trialCode}, look ${review.lookNumber} (analysis ${review.analysisId}${reviewVersion ? `, review version ${reviewVersion}` : ""}), cut-off ${review.cutoffDate ?? "not recorded"}.`,
    `# Written by Cairn (engine ${ENGINE_VERSION}) at ${input.generatedAt}.`,
    "#",
    "# Closed: this file holds arm-level counts. Only the DMC and the unblinded statistician may read it.",
    "# Cairn is decision support; the DMC charter, the protocol and the regulator decide.",
    "#",
    "# Run it with:  Rscript this-file.R   (base R only, no packages). From the stored counts and the",
    "# locked design below it recomputes the posterior summaries per arm, the two-arm probability, the",
    "# predictive (or monitoring) probability, the decision and the boundaries at this look, and prints",
    `# each next to Cairn's value with the absolute difference. Differences above ${REPRODUCTION_TOLERANCE} are flagged.`,
    "# Counts (boundaries) and the decision are compared exactly: 0 when equal, 1 when not.",
  ];
  const body = String.raw`
# ---- The locked design (priors resolved to Beta mixtures: weights w, shapes a, b) ----
${designLines(design).join("\n")}
level <- ${num(review.credibleLevel)}  # credible level of the intervals

# ---- The stored cumulative counts, look by look (evaluable for response; treated for toxicity) ----
counts <- as.data.frame(do.call(rbind, lapply(list(
${rows.map((r) => `list(${r.trim()})`).join(",\n")}
), function(r) data.frame(look = r[[1]], arm = r[[2]], planned_n = r[[3]], evaluable = r[[4]], responders = r[[5]], treated = r[[6]], toxicities = r[[7]], stringsAsFactors = FALSE))))
this_look <- max(counts$look)

# ---- The rule's comparisons are strict; a value within ${TIE_TOLERANCE} of its threshold is a tie ----
tie <- ${TIE_TOLERANCE}
exceeds <- function(v, t) v - t > tie
falls_below <- function(v, t) t - v > tie

# ---- Posterior mixtures ----
posterior <- function(pr, x, n) {
  lw <- log(pr$w) + lbeta(pr$a + x, pr$b + n - x) - lbeta(pr$a, pr$b)
  w <- exp(lw - max(lw))
  list(w = w / sum(w), a = pr$a + x, b = pr$b + n - x)
}
surv <- function(m, t) sum(m$w * pbeta(t, m$a, m$b, lower.tail = FALSE))
cdf <- function(m, t) sum(m$w * pbeta(t, m$a, m$b))
post_mean <- function(m) sum(m$w * m$a / (m$a + m$b))
post_sd <- function(m) sqrt(max(0, sum(m$w * m$a * (m$a + 1) / ((m$a + m$b) * (m$a + m$b + 1))) - post_mean(m)^2))
quant <- function(m, q) {
  if (length(m$w) == 1) return(qbeta(q, m$a, m$b))
  uniroot(function(p) cdf(m, p) - q, c(0, 1), tol = 1e-15)$root
}

# ---- P(X - Y > d) for independent Beta mixtures X, Y: integral of f_Y(y) P(X > y + d) dy ----
pair_diff <- function(aX, bX, aY, bY, d) {
  lo <- max(0, -d, qbeta(1e-17, aY, bY))
  hi <- min(1, 1 - d, qbeta(1e-17, aY, bY, lower.tail = FALSE))
  base <- if (d < 0) pbeta(-d, aY, bY) else 0
  if (!(hi > lo)) return(base)
  f <- function(y) dbeta(y, aY, bY) * pbeta(y + d, aX, bX, lower.tail = FALSE)
  base + integrate(f, lo, hi, rel.tol = 1e-11, abs.tol = 1e-14, subdivisions = 2000L)$value
}
prob_diff <- function(mX, mY, d) {
  s <- 0
  for (i in seq_along(mX$w)) for (j in seq_along(mY$w))
    if (mX$w[i] > 0 && mY$w[j] > 0) s <- s + mX$w[i] * mY$w[j] * pair_diff(mX$a[i], mX$b[i], mY$a[j], mY$b[j], d)
  min(1, max(0, s))
}

# ---- Predictive distribution of the future responders: beta-binomial mass through lbeta ----
predictive <- function(pr, x, n, N) {
  m <- N - n
  p <- posterior(pr, x, n)
  y <- 0:m
  out <- numeric(m + 1)
  for (k in seq_along(p$w)) out <- out + p$w[k] * exp(lchoose(m, y) + lbeta(p$a[k] + y, p$b[k] + m - y) - lbeta(p$a[k], p$b[k]))
  out
}

# ---- Boundaries: read count by count from a statistic over 0..n ----
boundary_from <- function(stat) {
  xs <- seq_along(stat) - 1
  fut <- xs[sapply(stat, falls_below, t = rule$thetaL)]
  eff <- if (rule$efficacy) xs[sapply(stat, exceeds, t = rule$thetaU)] else integer(0)
  c(futility_max = if (length(fut)) max(fut) else NA, efficacy_min = if (length(eff)) min(eff) else NA)
}
final_boundary_from <- function(success) {
  xs <- seq_along(success) - 1
  c(futility_max = if (any(!success)) max(xs[!success]) else NA, efficacy_min = if (any(success)) min(xs[success]) else NA)
}

# ---- Safety: P(toxicity rate above the limit | toxicities among treated) ----
safety_prob <- function(t, n) {
  post <- posterior(safety$prior, t, n)
  if (safety$kind == "uncertainStandard") prob_diff(post, safety$standard, safety$margin) else surv(post, safety$qmax)
}
safety_min <- function(n) {
  hit <- which(sapply(0:n, function(t) exceeds(safety_prob(t, n), safety$thetaS)))
  if (length(hit)) min(hit) - 1 else NA
}

now <- counts[counts$look == this_look, ]
decision <- NA
r <- list()
if (arms == "single") {
  cur <- now[now$arm == "single", ]
  x <- cur$responders; n <- cur$evaluable
  post <- posterior(prior, x, n)
  success_final <- sapply(0:nMax, function(k) exceeds(surv(posterior(prior, k, nMax), p0), rule$thetaT))
  pp <- function(x, n) {
    s <- success_final[(x:(x + nMax - n)) + 1]
    if (!any(s)) return(0)
    if (all(s)) return(1)
    min(1, max(0, sum(predictive(prior, x, n, nMax)[s])))
  }
  monitoring <- function(x, n) {
    if (rule$kind == "predictive") return(pp(x, n))
    m <- posterior(prior, x, n)
    if (rule$kind == "uncertainStandard") prob_diff(m, standard, delta) else surv(m, p0 + delta)
  }
  boundary_at <- function(n) if (n == nMax) final_boundary_from(success_final) else boundary_from(sapply(0:n, function(k) monitoring(k, n)))
  a <- (1 - level) / 2
  r[["single.posterior_mean"]] <- post_mean(post)
  r[["single.posterior_sd"]] <- post_sd(post)
  r[["single.posterior_median"]] <- quant(post, 0.5)
  r[["single.credible_lower"]] <- quant(post, a)
  r[["single.credible_upper"]] <- quant(post, 1 - a)
  r[["single.prob_above_p0"]] <- surv(post, p0)
  r[["single.clopper_pearson_lower"]] <- if (n == 0 || x == 0) 0 else qbeta(a, x, n - x + 1)
  r[["single.clopper_pearson_upper"]] <- if (n == 0 || x == n) 1 else qbeta(1 - a, x + 1, n - x)
  r[["look.prob_success_rule_now"]] <- surv(post, p0)
  stat <- if (n < nMax) monitoring(x, n) else NA
  r[[if (rule$kind == "predictive") "look.predictive_probability" else "look.monitoring_probability"]] <- stat
  b <- boundary_at(n)
  planned <- cur$planned_n
  bp <- if (!is.na(planned)) boundary_at(planned) else c(futility_max = NA, efficacy_min = NA)
  watched <- cur
} else {
  curT <- now[now$arm == "experimental", ]; curC <- now[now$arm == "control", ]
  xT <- curT$responders; nT <- curT$evaluable; xC <- curC$responders; nC <- curC$evaluable
  postT <- posterior(priorT, xT, nT); postC <- posterior(priorC, xC, nC)
  # The final rule over every control total: the smallest experimental total that succeeds.
  # P(pT - pC > delta) rises with xT and falls with xC, so the walk visits about 2 nMax points.
  min_success_t <- integer(nMax + 1)
  t <- 0
  for (k in 0:nMax) {
    while (t <= nMax && !exceeds(prob_diff(posterior(priorT, t, nMax), posterior(priorC, k, nMax), delta), rule$thetaT)) t <- t + 1
    min_success_t[k + 1] <- t
  }
  pp2 <- function(xT, nT, xC, nC) {
    fT <- predictive(priorT, xT, nT, nMax); fC <- predictive(priorC, xC, nC, nMax)
    mT <- nMax - nT; mC <- nMax - nC
    ok <- outer(0:mT, 0:mC, function(yT, yC) xT + yT >= min_success_t[xC + yC + 1])
    if (!any(ok)) return(0)
    if (all(ok)) return(1)
    min(1, max(0, sum(outer(fT, fC)[ok])))
  }
  monitoring2 <- function(xT, nT, xC, nC) {
    if (rule$kind == "predictive") pp2(xT, nT, xC, nC) else prob_diff(posterior(priorT, xT, nT), posterior(priorC, xC, nC), delta)
  }
  boundary_at2 <- function(nT, nC, xC) {
    if (nT == nMax && nC == nMax) {
      t <- min_success_t[xC + 1]
      return(c(futility_max = if (t > 0) t - 1 else NA, efficacy_min = if (t <= nMax) t else NA))
    }
    boundary_from(sapply(0:nT, function(k) monitoring2(k, nT, xC, nC)))
  }
  a <- (1 - level) / 2
  for (arm in c("experimental", "control")) {
    m <- if (arm == "experimental") postT else postC
    cx <- if (arm == "experimental") xT else xC
    cn <- if (arm == "experimental") nT else nC
    r[[paste0(arm, ".posterior_mean")]] <- post_mean(m)
    r[[paste0(arm, ".posterior_sd")]] <- post_sd(m)
    r[[paste0(arm, ".posterior_median")]] <- quant(m, 0.5)
    r[[paste0(arm, ".credible_lower")]] <- quant(m, a)
    r[[paste0(arm, ".credible_upper")]] <- quant(m, 1 - a)
    r[[paste0(arm, ".clopper_pearson_lower")]] <- if (cn == 0 || cx == 0) 0 else qbeta(a, cx, cn - cx + 1)
    r[[paste0(arm, ".clopper_pearson_upper")]] <- if (cn == 0 || cx == cn) 1 else qbeta(1 - a, cx + 1, cn - cx)
  }
  pdiff <- prob_diff(postT, postC, delta)
  r[["two_arm.prob_difference_exceeds_delta"]] <- pdiff
  r[["look.prob_success_rule_now"]] <- pdiff
  final2 <- nT == nMax && nC == nMax
  stat <- if (!final2) monitoring2(xT, nT, xC, nC) else NA
  r[[if (rule$kind == "predictive") "look.predictive_probability" else "look.monitoring_probability"]] <- stat
  b <- boundary_at2(nT, nC, xC)
  # The planned look's boundary is read at the control count observed when that look happened at
  # its planned size in both arms, otherwise at the control arm's current rate times the planned size.
  planned <- curT$planned_n
  if (!is.na(planned)) {
    e <- counts[counts$arm == "experimental", ]; k <- counts[counts$arm == "control", ]
    both <- merge(e, k, by = "look")
    seen <- both[both$evaluable.x == planned & both$evaluable.y == planned, ]
    xCp <- if (nrow(seen)) seen$responders.y[1] else min(planned, max(0, floor((if (nC > 0) xC / nC else 0) * planned + 0.5)))
    bp <- boundary_at2(planned, planned, xCp)
  } else bp <- c(futility_max = NA, efficacy_min = NA)
  x <- xT; n <- nT; final <- final2
  watched <- curT
}

# ---- The decision: safety first, then the final rule at the maximum, else futility, then efficacy ----
final_now <- if (arms == "single") n == nMax else final
safety_stop <- FALSE
if (!is.null(safety)) {
  ps <- safety_prob(watched$toxicities, watched$treated)
  r[["look.safety_probability"]] <- ps
  r[["safety.posterior_mean"]] <- post_mean(posterior(safety$prior, watched$toxicities, watched$treated))
  r[["safety.boundary.at_observed_n.toxicity_min"]] <- safety_min(watched$treated)
  if (!is.na(watched$planned_n)) r[["safety.boundary.at_planned_n.toxicity_min"]] <- safety_min(watched$planned_n)
  safety_stop <- exceeds(ps, safety$thetaS)
}
decision <- if (safety_stop) "stop_for_safety" else if (final_now) {
  if (exceeds(r[["look.prob_success_rule_now"]], rule$thetaT)) "final_success" else "final_no_success"
} else if (falls_below(stat, rule$thetaL)) "stop_for_futility" else if (rule$efficacy && exceeds(stat, rule$thetaU)) "stop_for_efficacy" else "continue"
r[["look.decision"]] <- decision
r[["boundary.at_observed_n.futility_max"]] <- unname(b["futility_max"])
r[["boundary.at_observed_n.efficacy_min"]] <- unname(b["efficacy_min"])
r[["boundary.at_planned_n.futility_max"]] <- unname(bp["futility_max"])
r[["boundary.at_planned_n.efficacy_min"]] <- unname(bp["efficacy_min"])

# ---- Cairn's values at this look, and the comparison ----
cairn <- list(
${checkRows.join(",\n")}
)
show <- function(v) if (is.character(v)) v else if (is.na(v)) "none" else formatC(v, digits = 15, format = "g")
cat(sprintf("%-46s %22s %22s %12s\n", "quantity", "R", "Cairn", "difference"))
worst <- 0
for (c in cairn) {
  name <- c[[1]]; theirs <- c[[2]]; kind <- c[[3]]
  mine <- r[[name]]
  if (is.null(mine)) mine <- NA
  d <- if (kind == "word") as.numeric(!identical(mine, theirs)) else if (kind == "count") {
    if (is.na(mine) && is.na(theirs)) 0 else if (is.na(mine) || is.na(theirs)) 1 else abs(mine - theirs)
  } else if (is.na(mine)) Inf else abs(mine - theirs)
  worst <- max(worst, d)
  cat(sprintf("%-46s %22s %22s %12.3e%s\n", name, show(mine), show(theirs), d, if (d > ${REPRODUCTION_TOLERANCE}) "  <-- differs" else ""))
}
cat(sprintf("largest difference: %.3e over %d quantities (tolerance ${REPRODUCTION_TOLERANCE})\n", worst, length(cairn)))
cat(if (worst > ${REPRODUCTION_TOLERANCE}) "RESULT: some values differ\n" else "RESULT: every value reproduced\n")
`;
  return `${header.join("\n")}\n${body}`;
}

/** A file name for the download: trial code and look, nothing a shell or a browser could misread. */
export function reproductionScriptFileName(trialCode: string, lookNumber: number): string {
  return `${trialCode}-look-${lookNumber}-reproduction.R`.replace(/[^A-Za-z0-9._-]/g, "_");
}
