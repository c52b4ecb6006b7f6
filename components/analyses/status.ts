import type { AnalysisStatus } from "@/lib/domain";

export const STATUS_TONES: Record<AnalysisStatus, "neutral" | "amber" | "teal" | "lichen"> = {
  planned: "neutral",
  open: "amber",
  locked: "teal",
  reviewed: "lichen",
};
