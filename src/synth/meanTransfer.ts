import type { ComplexMatrix } from "./complexMatrix.ts";
import { complexMultiply } from "./complexMatrix.ts";
import type { FermionModes } from "./fermionModel.ts";
import type { Propagator } from "./timeEvolution.ts";

/**
 * Exact mean transfers ⟨dE_A⟩, ⟨dE_B⟩, ⟨dN⟩ at many contact times. With
 * Ũ(t) = G D(t) G†, D = diag(e^{−iλ_k t}), the mean of a mode-diagonal
 * quantity O after the evolution is
 *   Tr[Ω Ũ F Ũ†] = Σ_{k,k'} R_{k'k} M_{kk'} e^{−i(λ_k − λ_k')t},
 * R = G† Ω G and M = G† F G, so after one O(n³) preparation each time costs
 * O(n²) (the same single-particle algebra as exactMoments.ts).
 */
export interface MeanTransfer {
  dE_A: number;
  dE_B: number;
  dN: number;
}

function sandwich(g: ComplexMatrix, diag: Float64Array): ComplexMatrix {
  // G† diag(d) G
  const n = g.rows;
  const scaled = { rows: n, cols: n, re: new Float64Array(n * n), im: new Float64Array(n * n) };
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < n; k++) {
      scaled.re[i * n + k] = diag[i] * g.re[i * n + k];
      scaled.im[i * n + k] = diag[i] * g.im[i * n + k];
    }
  }
  return complexMultiply(g, scaled, true);
}

export function meanTransferSeries(modes: FermionModes, propagator: Propagator): (t: number) => MeanTransfer {
  const n = modes.n;
  const G = propagator.G;
  const lambda = propagator.values;
  const omegaEA = new Float64Array(n);
  const omegaEB = new Float64Array(n);
  const omegaNB = new Float64Array(n);
  let initial = [0, 0, 0];
  for (let m = 0; m < n; m++) {
    const f = modes.occupation[m];
    if (modes.region[m] === 0) {
      omegaEA[m] = modes.energy[m];
      initial[0] += f * modes.energy[m];
    } else {
      omegaEB[m] = modes.energy[m];
      omegaNB[m] = 1;
      initial[1] += f * modes.energy[m];
      initial[2] += f;
    }
  }
  initial = initial.slice();
  const M = sandwich(G, modes.occupation);
  const R = [omegaEA, omegaEB, omegaNB].map((w) => sandwich(G, w));
  const cos = new Float64Array(n);
  const sin = new Float64Array(n);
  return (t: number) => {
    for (let k = 0; k < n; k++) {
      cos[k] = Math.cos(lambda[k] * t);
      sin[k] = Math.sin(lambda[k] * t);
    }
    const out = [0, 0, 0];
    for (let k = 0; k < n; k++) {
      for (let kp = 0; kp < n; kp++) {
        // e^{−i(λ_k − λ_k')t} = (cos_k − i sin_k)(cos_k' + i sin_k')
        const pr = cos[k] * cos[kp] + sin[k] * sin[kp];
        const pi = cos[k] * sin[kp] - sin[k] * cos[kp];
        const mr = M.re[k * n + kp];
        const mi = M.im[k * n + kp];
        // M_kk' e^{…}
        const xr = mr * pr - mi * pi;
        const xi = mr * pi + mi * pr;
        for (let o = 0; o < 3; o++) {
          const r = R[o];
          // Re(R_k'k · x)
          out[o] += r.re[kp * n + k] * xr - r.im[kp * n + k] * xi;
        }
      }
    }
    return { dE_A: out[0] - initial[0], dE_B: out[1] - initial[1], dN: out[2] - initial[2] };
  };
}
