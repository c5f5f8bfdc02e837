/**
 * Leverages of a joint fit's rows, hᵢ = jᵢᵀ (JᵀJ)⁻¹ jᵢ with jᵢ row i of the
 * (weighted) Jacobian of the joint problem (tangent-plane leverages of a
 * nonlinear fit; Cook & Weisberg 1982, *Residuals and Influence in
 * Regression*, §2.1 and §5.2), without forming the n × P Jacobian: a row of
 * group g reads only θₛ and θ_g, so hᵢ needs only the ((pₛ + p_l)²) block of
 * the exact covariance of (θₛ, θ_g) that engine/solve/block-covariance.ts
 * gives. Σᵢ hᵢ over all rows is P = pₛ + G·p_l (the trace of a projection of
 * rank P); the sum over one group's rows is that group's share of the
 * parameters: p_l plus its part of the pₛ shared ones.
 */
import type { JointSolved } from './joint';

/** Per group (setup order): the leverages of its rows (NaN when its covariance is not determined). */
export function jointLeverages(solved: JointSolved): Float64Array[] {
  const { setup, outcome, cov } = solved;
  const ps = setup.sharedIdx.length;
  const pl = setup.localIdx.length;
  const q = ps + pl;
  const p = setup.free.length;
  // column of J (free order) of each entry of (θₛ, θ_g)
  const cols = [...setup.sharedIdx, ...setup.localIdx];
  return setup.data.map((d, g) => {
    const n = d.n;
    const h = new Float64Array(n);
    const block = cov.groups[g];
    if (!block.determined) return h.fill(NaN);
    const theta = new Float64Array(p);
    setup.sharedIdx.forEach((j, m) => (theta[j] = outcome.shared[m]));
    setup.localIdx.forEach((j, m) => (theta[j] = outcome.local[g * pl + m]));
    const r = new Float64Array(n);
    const J = new Float64Array(n * p);
    setup.problems[g].residualsAndJacobian!(theta, r, J);
    const row = new Float64Array(q);
    for (let i = 0; i < n; i++) {
      for (let a = 0; a < q; a++) row[a] = J[cols[a] * n + i];
      let v = 0;
      for (let a = 0; a < q; a++) {
        let s = 0;
        for (let b = 0; b < q; b++) s += block.cov[a * q + b] * row[b];
        v += row[a] * s;
      }
      h[i] = v;
    }
    return h;
  });
}
