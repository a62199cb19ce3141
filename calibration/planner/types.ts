/**
 * Request and result types of the drive planner. The result objects use the snake_case keys of
 * the `plan --json` contract so the server preview and the command line print the same object.
 * Keys may be added, never renamed.
 */
import type { PumpTone } from './line';

export type PlanMode = 'cavity' | 'line';

export interface PlanRequest {
  mode: PlanMode;
  /** Operating point: give exactly one of fluxPhi0 (Φ/Φ0) or bias (calibration bias unit). */
  fluxPhi0?: number;
  bias?: number;
  /** Target: exactly one. Pair rate in pairs/s; gain (cavity only) in dB, phase-preserving, at ω_p/2. */
  targetPairRate?: number;
  targetGainDb?: number;
  /** Quality factors at the operating bias; when absent: calibration traces, then defaults. */
  ql?: number;
  qc?: number;
  /** Defaults used when neither given nor in the calibration's traces (warned). */
  defaultQl?: number;
  defaultQc?: number;
  /** Detection bandwidth B, Hz; band [f_c − B/2, f_c + B/2]. Cavity default: whole output; line default: B = f_p. */
  bandHz?: number;
  /** Detection band centre f_c, Hz (line mode); default f_p/2. */
  bandCentreHz?: number;
  /** Pump frequency. Cavity: when given, fixed (detuning follows from the pump shift); else chosen. Line: required. */
  pumpFrequencyHz?: number;
  /** Cavity: requested Δ/2π = f̄_r − f_p/2, Hz (default 0); used when pumpFrequencyHz is absent. */
  detuningHz?: number;
  /** Temperature of the input (and internal) bath, K; default 0 (vacuum input). */
  temperatureK?: number;
  /** dc flux period through the pump line, A per Φ0 (current bias of the pump port). */
  pumpPeriod?: number;
  /** Attenuators between generator and chip, dB, top (warm) → bottom (coldest). */
  attenuationDb?: number[];
  stageNames?: string[];
  /** Measured threshold power at the generator, dBm (cavity): P = P_th·(δΦ/δΦ_th)². */
  thresholdPowerDbm?: number;
  /** Pump-line impedance, Ω (default 50). */
  pumpLineZ0Ohm?: number;
  /** Lab-set limit for pump power dissipated at the coldest stage, W (default 1e-6, a placeholder). */
  coldStageLimitW?: number;
  /** Line mode: periodic pump waveform, tones relative to the harmonic-1 tone (which must exist). */
  waveform?: PumpTone[];
  /** Line mode: phase velocity of the line, m/s (for the effective-length numbers); else fixed.phase_velocity_m_s. */
  phaseVelocityMPerS?: number;
  /** Uncertainty draws (default 1000, 0 = none) and PRNG seed (default 12345). */
  uncertaintyDraws?: number;
  seed?: number;
  /** Distance to the half-flux lobe edge below which `near_lobe_edge` is raised, Φ0 (default 0.05). */
  lobeMarginPhi0?: number;
}

export type WarningCode =
  | 'near_threshold'
  | 'beyond_linear_response'
  | 'near_lobe_edge'
  | 'hysteretic_squid'
  | 'cold_stage_power'
  | 'thermal_occupation'
  | 'default_quality_factors'
  | 'quality_factors_extrapolated'
  | 'band_asymmetric'
  | 'no_covariance';

export interface PlanWarning {
  code: WarningCode;
  message: string;
}

export interface UncertaintySummary {
  draws: number;
  /** Draws rejected as unphysical (e.g. γ0 ≤ 0) or giving no finite result. */
  rejected: number;
  seed: number;
  method: 'cholesky' | 'cholesky+jitter';
  jitter: number;
  parameters: string[];
  pair_rate_p16: number;
  pair_rate_p50: number;
  pair_rate_p84: number;
  threshold_amplitude_p16_phi0: number | null;
  threshold_amplitude_p50_phi0: number | null;
  threshold_amplitude_p84_phi0: number | null;
  /** What was held fixed in each draw. */
  held_fixed: string;
}

export interface CautionObject {
  coldest_stage: string;
  coldest_stage_dissipation_w: number;
  limit_w: number;
  text: string;
}

export interface PlanResult {
  mode: PlanMode;
  operating_flux_phi0: number;
  operating_bias: number | null;
  resonance_hz: number | null;
  pump_frequency_hz: number;
  /** Cavity: ¼·(d²f_r/dΦ²)·δΦ², the pump-induced shift of the mean resonance, Hz. */
  pump_frequency_shift_hz: number | null;
  detuning_hz: number | null;
  /** Peak flux-pump amplitude δΦ, Φ0 (with a waveform: amplitude of its harmonic-1 tone). */
  pump_amplitude_phi0: number;
  threshold_amplitude_phi0: number | null;
  /** Cavity: δω/κ. */
  drive_ratio: number | null;
  /** Cavity: δΦ/δΦ_th (= drive_ratio on resonance). */
  threshold_ratio: number | null;
  predicted_pair_rate: number;
  /** Excess photons/s over the thermal background: out of the coupling port (cavity) or in the band (line). */
  photon_rate: number;
  intracavity_photons: number | null;
  gain_db: number | null;
  veff_over_v: number | null;
  delta_tau_s: number | null;
  tau_eff_s: number | null;
  /** Line: total emitted photon rate of the fundamental, δτ²ω_p³/(12π), vacuum. */
  total_photon_rate: number | null;
  /** Line: pairs/s with both partners inside the band (differs from predicted_pair_rate for an asymmetric band). */
  both_in_band_pair_rate: number | null;
  band_hz: { low: number; high: number } | null;
  ql: number | null;
  qc: number | null;
  qi: number | null;
  q_source: 'given' | 'traces' | 'default' | null;
  kappa_over_2pi_hz: number | null;
  slope_hz_per_phi0: number | null;
  curvature_hz_per_phi0_sq: number | null;
  dtau_dphi_s_per_phi0: number | null;
  n_thermal: number;
  temperature_k: number;
  beta_l: number | null;
  pump_current_a: number | null;
  power_at_chip_dbm: number | null;
  generator_power_dbm: number | null;
  stage_dissipation: { stage: string; attenuation_db: number; dissipated_w: number }[] | null;
  caution: CautionObject | null;
  context: Record<string, unknown> | null;
  harmonics_delta_tau_s: number[] | null;
  warnings: PlanWarning[];
  uncertainty: UncertaintySummary | null;
  conventions: string[];
}

export interface RankedPoint {
  rank: number;
  bias: number;
  operating_flux_phi0: number;
  score: number;
  reasons: string[];
  plan: PlanResult;
}

export interface RankResult {
  mode: PlanMode;
  scanned: number;
  feasible: number;
  bias_range: [number, number];
  scoring: string;
  points: RankedPoint[];
  /** Why some scanned points were infeasible (code → count). */
  refused: Record<string, number>;
}
