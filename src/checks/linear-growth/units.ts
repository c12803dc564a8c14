import { FLUX_UNIT, ONE, TRANSFER_UNIT, type UnitSpec, type ValueUnits } from "../valueUnits.ts";

/**
 * A channel's mean transfer ⟨x⟩(τ) is in J (heat) or a count (particles),
 * its flux per second; window edges are contact times in seconds. The slope
 * change is the quadratic term relative to the flux over the window, a pure
 * number like its margin.
 */
function channelUnits(channel: string): UnitSpec {
  const transfer = TRANSFER_UNIT[channel] ?? null;
  const flux = FLUX_UNIT[channel] ?? null;
  return {
    verdict: null,
    flux,
    flux_se: flux,
    flux_ci: flux,
    window: { from: "s", to: "s", points: ONE, start_index: ONE, end_index: ONE },
    onset: { time: "s", bracket: "s", points_before: ONE },
    end: { time: "s", bracket: "s", points_after: ONE, slope_after: flux },
    residual: { chi_square: ONE, dof: ONE, p_value: ONE },
    slope_change: { estimate: ONE, se: ONE, interval: ONE, equivalent: null },
    growth_p: ONE,
    transient: null,
    finite_size: { description: null, kind: null },
    noise: null,
    noise_scale: transfer,
    contact_times: ONE,
    runs_of_min_points: { total: ONE, rejected: ONE },
  };
}

const perChannel = (key: string, of: (channel: string) => UnitSpec) => (values: Readonly<Record<string, unknown>>) => {
  const v = values[key];
  return v && typeof v === "object" ? Object.fromEntries(Object.keys(v).map((c) => [c, of(c)])) : null;
};

export const linearGrowthUnits: ValueUnits = {
  flux: perChannel("flux", (c) => FLUX_UNIT[c] ?? null),
  flux_ci: perChannel("flux_ci", (c) => FLUX_UNIT[c] ?? null),
  channels: perChannel("channels", channelUnits),
  datasets: null,
  series: null,
  source: null,
  min_points: ONE,
  relative_tolerance: ONE,
};
