/**
 * Bumped whenever a change to lib/stats can change a reported number; stored with every result.
 * 1.2.0: two-arm type I error on the null boundary pT = pC + delta (maximum over control rates);
 * threshold ties never trigger a strict rule; uncertain-standard rules; operating characteristics with safety;
 * the closed review's safety rule counts toxicities among the treated patients.
 */
export const ENGINE_VERSION = "1.2.0";
