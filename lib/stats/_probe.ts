import jstat from "jstat";
import { betaCdf } from "./distributions";
import { mulberry32 } from "./simulation";
const r = mulberry32(1); let mx = 0, arg: number[] = [];
for (let i = 0; i < 20000; i++) { const a = r() < 0.5 ? 0.2 + 4.8 * r() : 5 + 295 * r(); const b = r() < 0.5 ? 0.2 + 4.8 * r() : 5 + 295 * r(); const p = 1e-6 + r() * (1 - 2e-6);
  const d = Math.abs(betaCdf(p, a, b) - jstat.jStat.ibeta(p, a, b)); if (d > mx) { mx = d; arg = [a, b, p]; } }
console.log(mx, arg);
