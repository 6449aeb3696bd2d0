// The invented world of the demo dataset: a fictional wind-farm operator's failure modes, the
// words its technicians use for each, and its sites. Nothing here describes a real company,
// place, person or data set.

export const FIRST_YEAR = 2019;
export const LAST_YEAR = 2024;
export const SLICE_COUNT = (LAST_YEAR - FIRST_YEAR + 1) * 4;

/** Words a report uses for one failure mode. "{n}" in a finding is replaced by a number. */
export interface FailureVocabulary {
  titles: string[];
  components: string[];
  findings: string[];
  actions: string[];
}

export interface FailureMode {
  name: string;
  description: string;
  /** Slice index from which reports of this mode occur. */
  firstSlice: number;
  /** Never labelled and absent from classes.json: only the truth file names it. */
  novel: boolean;
  vocabulary: FailureVocabulary;
  /** For the drifting mode: the wording that gradually replaces `vocabulary`. */
  laterVocabulary?: FailureVocabulary;
  /** For novel modes: the known modes whose words (and feature centroid) they partly share. */
  resembles?: { primary: string; secondary: string };
}

/** Slice index of "YYYY-Qn". */
export function sliceIndexOf(year: number, quarter: number): number {
  return (year - FIRST_YEAR) * 4 + (quarter - 1);
}

export function sliceKey(slice: number): string {
  return `${FIRST_YEAR + Math.floor(slice / 4)}-Q${(slice % 4) + 1}`;
}

export const DRIFTING_MODE = 'blade-surface-erosion';

export const FAILURE_MODES: FailureMode[] = [
  {
    name: 'gearbox-bearing-wear',
    description: 'Wear or spalling of gearbox bearings, seen as rising vibration, metal particles in the oil and warm bearings.',
    firstSlice: 0,
    novel: false,
    vocabulary: {
      titles: ['Gearbox inspection', 'Drivetrain check', 'Oil analysis follow-up'],
      components: ['gearbox', 'high-speed shaft bearing', 'planetary bearing', 'intermediate stage bearing', 'gearbox oil system'],
      findings: [
        'bearing spalling',
        'raised vibration at the gear mesh frequency',
        'metal particles in the oil filter',
        'bearing temperature at {n} °C',
        'pitting on the bearing raceway',
        'debris on the magnetic plug',
      ],
      actions: [
        'oil sample sent for analysis',
        'borescope inspection booked',
        'bearing replacement planned',
        'vibration trend to be watched',
        'oil filter changed',
      ],
    },
  },
  {
    name: DRIFTING_MODE,
    description:
      'Damage to the blade surface along the leading edge; over the years the crews stop calling it erosion and describe it as coating delamination.',
    firstSlice: 0,
    novel: false,
    vocabulary: {
      titles: ['Blade edge inspection', 'Leading-edge survey', 'Erosion check'],
      components: ['blade leading edge', 'blade tip', 'outer blade section', 'edge profile'],
      findings: ['leading-edge erosion', 'rain erosion pits', 'eroded edge profile', 'rough leading edge', 'exposed filler at the edge'],
      actions: ['edge repair scheduled', 'rope access team requested', 'erosion photographed for the trend'],
    },
    laterVocabulary: {
      titles: ['Blade coating survey', 'Coating repair check', 'Shell coating inspection'],
      components: ['blade shell', 'protective coating', 'leading-edge protection shield', 'coating system'],
      findings: [
        'coating delamination',
        'topcoat peeling',
        'protection shield lifting',
        'delaminated coating layer',
        'blistering under the coating',
      ],
      actions: ['coating rework planned', 'shield reapplication booked', 'delamination mapped by drone'],
    },
  },
  {
    name: 'pitch-system-fault',
    description: 'Faults of the blade pitch system: pitch motors, hydraulics, accumulators, pitch bearings and the hub controller.',
    firstSlice: 0,
    novel: false,
    vocabulary: {
      titles: ['Pitch system fault', 'Hub inspection', 'Pitch alarm investigation'],
      components: ['pitch motor', 'pitch drive', 'pitch accumulator', 'hydraulic pitch cylinder', 'pitch bearing', 'hub controller'],
      findings: [
        'pitch angle deviation of {n} degrees',
        'pitch motor overcurrent',
        'low accumulator pressure',
        'hydraulic leak at the pitch cylinder',
        'pitch runaway alarm',
        'slow pitch response',
      ],
      actions: ['accumulator recharged', 'pitch motor replaced', 'hydraulic seals renewed', 'pitch calibration repeated'],
    },
  },
  {
    name: 'generator-winding-overheating',
    description: 'Generator windings running hot: cooling faults, ageing insulation and temperature trips.',
    firstSlice: 0,
    novel: false,
    vocabulary: {
      titles: ['Generator temperature alarm', 'Generator inspection', 'Cooling system check'],
      components: ['generator stator', 'generator winding', 'generator cooling fan', 'slip ring unit', 'generator air filter'],
      findings: [
        'winding temperature at {n} °C',
        'insulation resistance dropping',
        'overheating trip',
        'hot spot on the thermal image',
        'reduced cooling airflow',
      ],
      actions: ['cooling fan replaced', 'insulation test done', 'air filters cleaned', 'output derated until repair'],
    },
  },
  {
    name: 'yaw-drive-misalignment',
    description: 'The nacelle does not track the wind: yaw drive, yaw brake or wind vane faults leave a standing yaw error.',
    firstSlice: 0,
    novel: false,
    vocabulary: {
      titles: ['Yaw system check', 'Yaw error investigation', 'Wind vane check'],
      components: ['yaw drive', 'yaw gear rim', 'yaw brake', 'wind vane', 'yaw motor'],
      findings: [
        'persistent yaw error of {n} degrees',
        'misalignment against the wind vane',
        'yaw brake pad wear',
        'noise from the yaw gear',
        'cable twist alarm',
      ],
      actions: ['wind vane recalibrated', 'yaw brake pads replaced', 'yaw gear greased', 'yaw offset corrected'],
    },
  },
  {
    name: 'converter-fault',
    description: 'Faults of the power converter: IGBT modules, the DC link, converter cooling and grid-side trips.',
    firstSlice: 0,
    novel: false,
    vocabulary: {
      titles: ['Converter trip', 'Converter cabinet inspection', 'Power electronics check'],
      components: [
        'power converter',
        'IGBT module',
        'DC link capacitor',
        'converter cabinet',
        'grid-side inverter',
        'converter cooling pump',
      ],
      findings: [
        'converter trip',
        'IGBT failure',
        'DC link overvoltage',
        'coolant leak in the converter',
        'grid fault ride-through alarm',
        'bulging capacitor',
      ],
      actions: ['IGBT module swapped', 'converter reset and monitored', 'coolant topped up', 'capacitor bank replaced'],
    },
  },
  {
    name: 'lightning-receptor-damage',
    description: 'Lightning strikes burning blade tip receptors and breaking the down conductor; first seen after the storms of 2021.',
    firstSlice: sliceIndexOf(2021, 2),
    novel: true,
    resembles: { primary: DRIFTING_MODE, secondary: 'converter-fault' },
    vocabulary: {
      titles: ['Blade inspection after storm', 'Blade tip damage', 'Storm follow-up'],
      components: ['lightning receptor', 'down conductor', 'blade tip receptor', 'lightning protection system'],
      findings: [
        'burn marks at the receptor',
        'scorched blade tip',
        'down conductor continuity failure',
        'strike counter advanced by {n}',
        'melted receptor disc',
      ],
      actions: ['receptor replaced', 'down conductor resistance measured', 'strike damage photographed'],
    },
  },
  {
    name: 'main-shaft-cracking',
    description: 'Cracks in the main shaft near the flange, found by ultrasonic testing; first seen in 2023.',
    firstSlice: sliceIndexOf(2023, 1),
    novel: true,
    resembles: { primary: 'gearbox-bearing-wear', secondary: 'generator-winding-overheating' },
    vocabulary: {
      titles: ['Drivetrain check', 'Main shaft inspection', 'Vibration follow-up'],
      components: ['main shaft', 'main shaft flange', 'rotor lock', 'main bearing housing'],
      findings: [
        'hairline crack on the main shaft',
        'crack indication from the ultrasonic test',
        'fretting at the shaft flange',
        'crack grown to {n} mm',
      ],
      actions: ['ultrasonic testing repeated', 'turbine stopped pending engineering review', 'crack measured and logged'],
    },
  },
];

/** Share of each known mode among known-mode reports (same order as the known entries above). */
export const KNOWN_MODE_WEIGHTS = [0.2, 0.22, 0.17, 0.14, 0.13, 0.14];

/** Share of all reports in a slice that belong to a novel mode: ramps up after it first appears. */
export function novelShare(mode: FailureMode, slice: number): number {
  if (!mode.novel || slice < mode.firstSlice) return 0;
  const since = slice - mode.firstSlice;
  return mode.name === 'lightning-receptor-damage' ? Math.min(0.09, 0.04 + 0.01 * since) : Math.min(0.1, 0.05 + 0.01 * since);
}

/** Share of the drifting mode's words already in the later wording: none before 2020-Q1, all from 2024-Q1. */
export function driftProgress(slice: number): number {
  const start = sliceIndexOf(2020, 1);
  const end = sliceIndexOf(2024, 1);
  return Math.min(1, Math.max(0, (slice - start) / (end - start)));
}

/** Target share of labelled reports: 60% through 2020, then falling to 7% in the newest slice. */
export function labelledShare(slice: number): number {
  const steadyUntil = sliceIndexOf(2020, 4);
  if (slice <= steadyUntil) return 0.6;
  return 0.6 - ((0.6 - 0.07) * (slice - steadyUntil)) / (SLICE_COUNT - 1 - steadyUntil);
}

export interface Site {
  name: string;
  /** Exposed ridge sites attract most lightning strikes. */
  exposed: boolean;
}

export const SITES: Site[] = [
  { name: 'Brimwhistle Ridge', exposed: true },
  { name: 'Quillmarsh Flats', exposed: false },
  { name: 'Saltwhorl Bank', exposed: false },
  { name: 'Tarnvelt Moor', exposed: false },
  { name: 'Oxbright Downs', exposed: false },
  { name: 'Glimmerholt Crest', exposed: true },
];

/** Words every report may use, whatever its failure mode. */
export const SHARED_WORDS = {
  crews: ['the field crew', 'the service technician', 'the night shift', 'a contractor team', 'the rope access team'],
  visits: ['a routine visit', 'the annual service', 'an unplanned call-out', 'a drone survey', 'a climb inspection'],
  trends: ['unchanged', 'slightly worse', 'stable', 'worse than last time', 'within limits'],
  weather: ['calm', 'gusty', 'wet', 'cold and clear', 'windy with showers'],
  access: ['access by road', 'access delayed by wind', 'crane not needed', 'tower lift out of service', 'site access fine'],
  remarks: [
    'checked twice',
    'see photos',
    'no further remarks',
    'parts on order',
    'logbook updated',
    'spares taken from stock',
    'handover to day shift',
  ],
  genericTitles: ['Routine inspection', 'Unplanned call-out', 'Annual service', 'Service visit'],
};
