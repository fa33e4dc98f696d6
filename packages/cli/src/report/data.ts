/**
 * Everything the design-review page is drawn from, in SI units. The page renders this object
 * and nothing else, so a section never recomputes a number the analyses produced; `twinfet
 * report --json` prints it.
 */
import type { Design, DeviceOperatingPoint, FigureDefinition, ResistorOperatingPoint } from '@twinfet/core';
import type { RunReport } from '@twinfet/montecarlo';
import type { AreaStudy } from './analyses/area.js';
import type { DistributionStudy } from './analyses/distribution.js';
import type { TransferStudy } from './analyses/transfer.js';

/** How the page was made: enough to make it again. */
export interface ReportMeta {
  readonly tool: 'twinfet';
  readonly version: string;
  readonly node: string;
  readonly platform: string;
  /** When the page was generated (ISO 8601). */
  readonly generated: string;
  /** The command line that reproduces the page's numbers (seed included). */
  readonly command: readonly string[];
  /** The design file as given, and the SHA-256 of its bytes. */
  readonly source: string;
  readonly sourceSha256: string;
  /** Wall time of the analyses, s. */
  readonly seconds: number;
}

/**
 * Results per operating condition (report section 8), for designs that have conditions: the
 * rows of the run's `conditions` (row i is `run.conditions[i]`, so the page tags its numbers with
 * the run's JSON paths) with what each condition sets, the all-conditions yield (the run's
 * `yield`) and the drift (the run's `drift`) with its histogram. Values are SI.
 */
export interface ConditionsData {
  readonly rows: readonly ConditionRow[];
  /** The drift of the figure between two conditions, per instance; absent when none is taken. */
  readonly drift?: DriftData;
}

/** One operating condition. */
export interface ConditionRow {
  /** The condition's name, e.g. "hot". */
  readonly name: string;
  /** What the condition sets, e.g. { field: 'temperature', value: 398.15, unit: 'K' }; a shift as { field: 'shift n.kp', value: -0.1, unit: '%' }. */
  readonly settings: readonly { readonly field: string; readonly value: number; readonly unit: string }[];
  /** Chip yield from this condition's own instance yield and interval, (y)^instances. */
  readonly chipYield: number;
  readonly chipYieldInterval: readonly [number, number];
}

/** The per-instance change of the figure from one condition to another (same mismatch draws), per kelvin. */
export interface DriftData {
  /** Equal bins from `lo`, `binWidth` wide (the run's drift histogram trimmed to its occupied bins), the figure's unit per K. */
  readonly histogram: { readonly lo: number; readonly binWidth: number; readonly counts: readonly number[] };
}

/** The report's data. */
export interface ReportData {
  readonly meta: ReportMeta;
  /** The design as analysed (SI units), with the spec actually used in `run.yield.spec`. */
  readonly design: Design;
  readonly stage: {
    readonly topology: string;
    /** A sentence or two on the topology (the core's one-line summary when the report has no definition of the type). */
    readonly description: string;
    /** The stage's figure as the core defines it (name, label, symbol, SI unit or '' for a fraction, sides). */
    readonly figure: FigureDefinition;
    /** The stage's blocks (`input`, `load`, ...) with their labels and element names. */
    readonly blocks: readonly { readonly key: string; readonly label: string; readonly kind: 'mos' | 'resistor'; readonly elements: readonly string[] }[];
    readonly variables: readonly { readonly device: string; readonly role: string; readonly parameter: string; readonly sigma: number; readonly rho: number }[];
  };
  readonly operatingPoint: readonly DeviceOperatingPoint[];
  /** Resistor rows, for stages that have resistors. */
  readonly resistors?: readonly ResistorOperatingPoint[];
  readonly warnings: readonly string[];
  /** True when --spec replaced the design's spec. */
  readonly specOverridden: boolean;
  /**
   * The Monte Carlo run, as `twinfet run --json` prints it for the same options (which names the
   * `offset` block after the figure); `importance` when the high-sigma estimate ran.
   */
  readonly run: RunReport;
  /** Whether the high-sigma estimate ran, and why (or why not). */
  readonly highSigma: { readonly ran: boolean; readonly reason: string };
  readonly distribution: DistributionStudy;
  readonly area: AreaStudy;
  /** The transfer curve, or why there is none for this stage type. */
  readonly transfer: TransferStudy | { readonly none: string };
  /** Present only when the design has operating conditions. */
  readonly conditions?: ConditionsData;
}
