/**
 * Built-in examples: invented scenarios with invented numbers, for the preview and for
 * "Insert example". Each has a header row; the first column is y.
 */
export interface Example {
  readonly id: string;
  readonly title: string;
  readonly description: string;
  readonly header: readonly string[];
  readonly rows: readonly (readonly (number | string | null)[])[];
  readonly degree: number;
  readonly intercept: boolean;
  /** Name of the weights column, if any (it is not a predictor). */
  readonly weights?: string;
  /** Readings of unknown samples to read back from the curve (calibration examples). */
  readonly readings?: readonly number[];
}

const drift = {
  tempC: [18.5, 19.0, 19.5, 20.0, 20.5, 21.0, 21.5, 22.0, 22.5, 23.0, 23.5, 24.0],
  humidity: [41, 38, 45, 50, 47, 52, 44, 58, 55, 49, 61, 57],
  drift: [1.12, 1.31, 1.42, 1.66, 1.74, 1.95, 2.01, 2.32, 2.38, 2.49, 2.81, 2.86],
};

export const EXAMPLES: readonly Example[] = [
  {
    id: "photometer",
    title: "Dye standards on a bench photometer (curved calibration, two unknown samples)",
    description:
      "Absorbance of dye standards measured twice each on a bench photometer. The response bends at high concentration, so a straight line misses it (the lack-of-fit test says so) and a quadratic is fitted; two unknown samples are then read back from the curve.",
    header: ["absorbance", "dye (mg/L)"],
    rows: [
      [0.006, 0],
      [0.002, 0],
      [0.114, 1],
      [0.111, 1],
      [0.215, 2],
      [0.219, 2],
      [0.41, 4],
      [0.406, 4],
      [0.589, 6],
      [0.594, 6],
      [0.756, 8],
      [0.751, 8],
      [0.897, 10],
      [0.902, 10],
    ],
    degree: 2,
    intercept: true,
    readings: [0.342, 0.688],
  },
  {
    id: "thermocouple",
    title: "Oven probe calibration (straight line)",
    description: "Readings of a test-oven probe against a reference thermometer at nine set points.",
    header: ["probe reading (mV)", "reference (°C)"],
    rows: [
      [0.02, 0],
      [2.04, 50],
      [4.11, 100],
      [6.12, 150],
      [8.17, 200],
      [10.19, 250],
      [12.28, 300],
      [14.3, 350],
      [16.36, 400],
    ],
    degree: 1,
    intercept: true,
  },
  {
    id: "dependent",
    title: "Gauge drift with the temperature logged twice (dependent columns)",
    description: "Drift of a length gauge against room temperature and humidity; a second logger recorded the same temperature in °F.",
    header: ["drift (µm)", "Temp °C", "humidity (%)", "Temp °F"],
    rows: drift.tempC.map((c, i) => [drift.drift[i]!, c, drift.humidity[i]!, Math.round((32 + 1.8 * c) * 100) / 100]),
    degree: 1,
    intercept: true,
  },
  {
    id: "cure",
    title: "Coating hardness over curing time (cubic)",
    description: "Hardness of a test coating measured as it cures; a cubic in time.",
    header: ["hardness (units)", "cure time (h)"],
    rows: [
      [11.8, 1],
      [19.6, 2],
      [25.1, 3],
      [28.9, 4],
      [31.2, 5],
      [32.1, 6],
      [32.9, 7],
      [33.4, 8],
      [34.6, 9],
      [36.2, 10],
      [39.0, 11],
      [43.1, 12],
    ],
    degree: 3,
    intercept: true,
  },
  {
    id: "weighted",
    title: "Flow meter check with uneven scatter (weighted)",
    description: "Indicated flow against delivered volume; the scatter grows with flow, so each row is weighted by 1 / variance.",
    header: ["indicated (L/min)", "delivered (L/min)", "weight"],
    rows: [
      [2.03, 2, 100],
      [4.05, 4, 100],
      [6.01, 6, 44],
      [8.12, 8, 25],
      [10.08, 10, 16],
      [12.31, 12, 11],
      [13.88, 14, 8],
      [16.4, 16, 6],
      [18.02, 18, 5],
      [20.61, 20, 4],
    ],
    degree: 1,
    intercept: true,
    weights: "weight",
  },
  {
    id: "gaps",
    title: "Settlement survey with gaps (skipped rows)",
    description: "Settlement of a survey marker against months since construction and rainfall; some readings are missing.",
    header: ["settlement (mm)", "months", "rainfall (mm)"],
    rows: [
      [0.8, 1, 62],
      [1.9, 2, 80],
      ["n/a", 3, 75],
      [3.7, 4, 41],
      [4.4, 5, null],
      [5.6, 6, 58],
      [6.1, 7, 90],
      [7.3, 8, 77],
      [null, 9, 65],
      [8.8, 10, 52],
      [9.9, 11, 70],
    ],
    degree: 1,
    intercept: true,
  },
];
