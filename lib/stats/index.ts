/**
 * The public API of Cairn's statistics engine (pure functions, no I/O). Every function throws a
 * StatsDomainError for input outside its stated domain.
 */
export * from "./types";
export { StatsDomainError } from "./validate";
export { ENGINE_VERSION } from "./version";
export * from "./distributions";
export * from "./priors";
export * from "./looks";
export * from "./predictive";
export * from "./decision";
export * from "./boundaries";
export * from "./operating-characteristics";
export * from "./simulation";
export * from "./calibration";
export * from "./difference";
export * from "./posterior";
export * from "./hpd";
export * from "./frequentist";
export * from "./compare";
export * from "./labels";
export * from "./calibration-two-arm";
