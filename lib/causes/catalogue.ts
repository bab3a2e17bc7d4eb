import type { CauseBranch } from './branches';

/*
 * Probable causes of capsule defects on a semi-automatic hard-capsule filler (rectifier, vacuum
 * separation into cap and body rings, powder station with auger and dosing shoe, closing by
 * pins). These are starting points for an investigator, not conclusions: each says what to
 * check. Facts of the trade with no published source are marked 'common practice'; the few
 * numbers recalled from shell makers' literature without a document at hand are marked
 * 'from memory'.
 */

export type CauseBasis = 'common practice' | 'from memory';

/** In the order they are shown: product first, then people's safety at the machine. */
export const cautionIds = ['quarantine', 'interlock', 'power_isolated'] as const;
export type CautionId = (typeof cautionIds)[number];

export const cautionTexts: Record<CautionId, string> = {
  interlock:
    'Never defeat, bridge or tape over an interlock. An open rectifier door or maintenance panel stops the machine on purpose; close it, do not bypass it.',
  power_isolated:
    'Adjust or inspect rings, pins, dosing shoe and powder station only with power isolated (locked out) as the site SOP requires.',
  quarantine:
    'Critical defect: quarantine the batch in process first; the investigation comes after the product is secured.',
};

export interface ProbableCause {
  id: string;
  branch: CauseBranch;
  /** The condition, and what it does to the capsule. */
  cause: string;
  /** A short, practical thing to look at. */
  check: string;
  basis: CauseBasis;
  cautions: readonly CautionId[];
}

const cause = (
  id: string,
  branch: CauseBranch,
  text: string,
  check: string,
  options: { basis?: CauseBasis; cautions?: CautionId[] } = {},
): ProbableCause => ({ id, branch, cause: text, check, basis: options.basis ?? 'common practice', cautions: options.cautions ?? [] });

/** The vacuum gauge range most semi-automatic fillers run in (common practice). */
export const vacuumRangeInHg = { low: 9, high: 12 } as const;
/** Usual moisture content of hard gelatin shells (from memory: shell makers quote about 13–16 %). */
export const gelatinShellMoisturePercent = { low: 13, high: 16 } as const;

const vacuumRange = `${vacuumRangeInHg.low}–${vacuumRangeInHg.high} inHg`;
const moistureRange = `${gelatinShellMoisturePercent.low}–${gelatinShellMoisturePercent.high} %`;

export const causes = {
  vacuumTooHigh: cause(
    'vacuum_too_high',
    'machine',
    'Vacuum too high: bodies are pulled down hard, crack or break, and bounce in the ring.',
    `Read the vacuum gauge; it is normally set in the ${vacuumRange} range. Lower it in small steps and watch the bodies seat.`,
  ),
  vacuumTooLow: cause(
    'vacuum_too_low',
    'machine',
    'Vacuum too low: caps and bodies do not separate, or rings have to be run over the vacuum several times to separate them.',
    `Read the vacuum gauge (normally ${vacuumRange}); check the vacuum filter, hoses and the seal under the ring.`,
  ),
  shellMakerChange: cause(
    'shell_maker_change',
    'material',
    `Empty-shell lot from a different shell maker: fit and separation force differ, so the vacuum may need setting outside the usual ${vacuumRange}.`,
    'Compare the shell lot and maker with the last good run; record any vacuum change made for the new lot.',
  ),
  dentedRing: cause(
    'dented_ring',
    'machine',
    'Dented or worn filling ring: the ring does not seal on the vacuum plate and bores are out of round, giving poor separation and uneven fills.',
    'Inspect the ring faces and bores for dents and burrs; quarantine a damaged ring on its record.',
    { cautions: ['power_isolated'] },
  ),
  bodiesProud: cause(
    'bodies_proud',
    'machine',
    'Bodies standing proud of the ring (not fully seated): the powder station shears the rims, breaking bodies and losing fill.',
    'Look across the body ring before it goes under the powder station: every body flush with the ring face.',
    { cautions: ['power_isolated'] },
  ),
  excessPowderOnRing: cause(
    'excess_powder_on_ring',
    'method',
    'Excess powder left on the ring face before closing: it ends up on the outside of the shell and in the cap–body joint.',
    'Check the ring is scraped or brushed clean between filling and closing, as the batch record says.',
  ),
  augerSpeed: cause(
    'auger_speed',
    'machine',
    'Auger speed off its setting: a faster auger gives heavier capsules, a slower one lighter.',
    'Compare the auger setting with the batch record; adjust auger and table speed before touching the dosing shoe.',
  ),
  tableSpeed: cause(
    'table_speed',
    'machine',
    'Fill-table speed off its setting: a faster table gives lighter capsules, a slower one heavier.',
    'Compare the table speed with the batch record and the last good weight check.',
  ),
  dosingShoeClearance: cause(
    'dosing_shoe_clearance',
    'machine',
    'Dosing-shoe clearance wrong (normally about 0.003 in, roughly a sheet of paper): too wide or too tight changes the fill and can scrape the ring.',
    'Check the clearance with a feeler gauge, only with the machine’s power off.',
    { cautions: ['power_isolated'] },
  ),
  hopperLevel: cause(
    'hopper_level',
    'method',
    'Powder level in the hopper allowed to run low or vary: the auger feeds less and fills drift light, or the station runs dry.',
    'Check the hopper top-up interval in the batch record against the weight checks.',
  ),
  powderFlow: cause(
    'powder_flow',
    'material',
    'Powder lot flows differently or has a different bulk density (blend, particle size, moisture): the same settings give a different fill.',
    'Compare the tapped bulk density and flow of this lot with the last good lot.',
  ),
  shellsTooDry: cause(
    'shells_too_dry',
    'material',
    `Shells too dry and brittle: they crack or split on separation and closing. Hard gelatin shells are normally kept at about ${moistureRange} moisture.`,
    'Check shell storage conditions and how long cartons stood open; test loss on drying of the lot if the site can.',
    { basis: 'from memory' },
  ),
  shellsTooMoist: cause(
    'shells_too_moist',
    'material',
    'Shells too moist and soft: they dent, stick together and separate poorly.',
    'Check shell storage and the room humidity log; look for shells sticking in the rectifier.',
  ),
  roomTooDry: cause(
    'room_too_dry',
    'environment',
    'Filling room humidity too low, or shells left out of their cartons: shells lose moisture and become brittle.',
    'Read the room humidity log for the run and the time the shells stood open.',
  ),
  roomTooHumid: cause(
    'room_too_humid',
    'environment',
    'Filling room humidity too high: shells soften and powder flow worsens.',
    'Read the room humidity log for the run.',
  ),
  vacuumGauge: cause(
    'vacuum_gauge',
    'measurement',
    'Vacuum gauge out of calibration or misread: the setting looks right and is not.',
    'Check the gauge calibration status and compare it with a reference gauge.',
  ),
  balanceTare: cause(
    'balance_tare',
    'measurement',
    'Weight check wrong: balance not checked, or the wrong empty-shell mass subtracted from gross weights.',
    'Check the balance daily check and the shell mass used in the weight checks.',
  ),
  settingChangeUnrecorded: cause(
    'setting_change_unrecorded',
    'people',
    'A setting changed during the run (shift change, after a stoppage) without a record or a weight check after it.',
    'Interview the operators on each shift; compare the batch record entries with the weight-check times.',
  ),
  interlockStop: cause(
    'interlock_stop',
    'machine',
    'Machine stopped mid-cycle because an interlock tripped (an open rectifier door or maintenance panel): rings left between stations can be part-filled or keep caps.',
    'Check the stoppage log; after a stop, clear and inspect the rings in process before restarting.',
    { cautions: ['interlock', 'power_isolated'] },
  ),
  ringNotCleared: cause(
    'ring_not_cleared',
    'method',
    'Rings not emptied and checked after a jam or stoppage: caps or bodies stay in the bores and meet the next cycle.',
    'Check the procedure for clearing jams and whether it was signed for this stop.',
  ),
  closingPressure: cause(
    'closing_pressure',
    'machine',
    'Closing pins or pressure set wrong: too much drives the body through the cap, too little leaves the capsule unlocked.',
    'Check the closing pin height and pressure setting against the size part set.',
    { cautions: ['power_isolated'] },
  ),
  ringAlignment: cause(
    'ring_alignment',
    'machine',
    'Cap and body rings misaligned when joined for closing: the cap meets the body off centre.',
    'Check ring pins and the register of the cap ring on the body ring.',
    { cautions: ['power_isolated'] },
  ),
  shellDimensions: cause(
    'shell_dimensions',
    'material',
    'Shell dimensions at the edge of the size specification (length, diameter, wall), often with a new maker or lot.',
    'Check the shell certificate of analysis and measure a few shells against the size specification.',
  ),
  ejectionPins: cause(
    'ejection_pins',
    'machine',
    'Ejection pins bent or striking off centre: bodies are pierced or crushed on the way out.',
    'Inspect the ejection pins.',
    { cautions: ['power_isolated'] },
  ),
  handling: cause(
    'handling',
    'people',
    'Rough handling of shells or filled capsules: dropped containers, overfilled drums, pressing on bags.',
    'Ask how containers were filled, moved and stacked.',
  ),
  noDedusting: cause(
    'no_dedusting',
    'method',
    'Capsules not dedusted or polished after filling, or the polisher not working.',
    'Check the dedusting step in the batch record and the polisher’s condition.',
  ),
  lineClearance: cause(
    'line_clearance',
    'method',
    'Line clearance incomplete: shells, capsules or powder of another product or lot left on the line, in rings or in the hopper.',
    'Review the line clearance record of this batch and the previous product on the line.',
  ),
  wrongLotIssued: cause(
    'wrong_lot_issued',
    'people',
    'Wrong shell or powder lot issued or picked at the line.',
    'Compare the lot numbers on the containers at the line with the batch record and the dispensing record.',
  ),
  identityCheck: cause(
    'identity_check',
    'measurement',
    'Identity of shells and powder not checked at the line, or checked against the wrong document.',
    'Check the line-side identity check entries in the batch record.',
  ),
  sharedRoom: cause(
    'shared_room',
    'environment',
    'Several products or lots open in the same room or corridor at once.',
    'Check the room log for other products present during the run.',
  ),
  wearParts: cause(
    'wear_parts',
    'machine',
    'Worn or damaged parts shedding fragments: dosing shoe scraping the ring, burrs on rings, loose fasteners.',
    'Inspect the dosing shoe, ring faces and fasteners for scoring and missing pieces; keep any fragment as evidence.',
    { cautions: ['power_isolated'] },
  ),
  cleaning: cause(
    'cleaning',
    'method',
    'Cleaning between batches incomplete, or residue of cleaning materials left on product-contact parts.',
    'Review the cleaning record and the visual check of the parts before assembly.',
  ),
  gowning: cause(
    'gowning',
    'people',
    'Gowning or glove practice: fibres, glove fragments or hair reach the product.',
    'Check gloves and garments used on the shift for tears; review gowning training.',
  ),
  incomingMaterial: cause(
    'incoming_material',
    'material',
    'Contaminated incoming powder or shell lot.',
    'Check the retained samples of the powder and shell lots and the suppliers’ certificates.',
  ),
  roomCleanliness: cause(
    'room_cleanliness',
    'environment',
    'Room not clean, dust extraction not working, or pests.',
    'Review the room cleaning log, extraction checks and pest-control records.',
  ),
  supplierShellDefect: cause(
    'supplier_shell_defect',
    'material',
    'Defect made in shell manufacture (bubbles, pinholes, print or colour faults): present in the empty shells before filling.',
    'Inspect retained empty shells of the same lot; open a supplier complaint if they show it.',
  ),
  incomingInspection: cause(
    'incoming_inspection',
    'measurement',
    'Incoming inspection of the empty-shell lot did not sample enough, or did not look for this defect.',
    'Check the incoming inspection record: sample size, AQL and the defect list used.',
  ),
  shellStorageLight: cause(
    'shell_storage',
    'environment',
    'Shells stored outside the maker’s conditions (heat, light, humidity): colour fades and shells change.',
    'Check the warehouse temperature and humidity records for the shell lot.',
  ),
  visualCheckMissed: cause(
    'visual_check_missed',
    'people',
    'In-process visual checks missed or done too rarely to catch the defect early.',
    'Compare the in-process check times with when the defect first appears.',
  ),
  powderStationDry: cause(
    'powder_station_dry',
    'method',
    'Powder station ran dry or the ring passed it out of sequence: bodies closed with no fill.',
    'Check the hopper level record and whether any ring was run twice or skipped a station.',
  ),
} as const satisfies Record<string, ProbableCause>;

const c = causes;

/** Probable causes by defect code (the codes of the capsule defect catalogue). */
export const causesByDefect: Readonly<Record<string, readonly ProbableCause[]>> = {
  cracked_shell: [c.vacuumTooHigh, c.dentedRing, c.closingPressure, c.shellsTooDry, c.shellMakerChange, c.vacuumGauge, c.settingChangeUnrecorded, c.roomTooDry],
  broken_body: [c.vacuumTooHigh, c.bodiesProud, c.dentedRing, c.ejectionPins, c.shellsTooDry, c.vacuumGauge, c.handling, c.roomTooDry],
  dented_shell: [c.handling, c.ejectionPins, c.shellsTooMoist, c.roomTooHumid, c.closingPressure],
  light_fill: [c.hopperLevel, c.augerSpeed, c.tableSpeed, c.dosingShoeClearance, c.dentedRing, c.bodiesProud, c.powderFlow, c.balanceTare, c.settingChangeUnrecorded, c.roomTooHumid],
  heavy_fill: [c.augerSpeed, c.tableSpeed, c.dosingShoeClearance, c.dentedRing, c.powderFlow, c.balanceTare, c.settingChangeUnrecorded],
  empty_capsule: [c.powderStationDry, c.vacuumTooLow, c.interlockStop, c.ringNotCleared, c.visualCheckMissed, c.vacuumGauge],
  unseparated: [c.vacuumTooLow, c.dentedRing, c.shellMakerChange, c.shellsTooMoist, c.vacuumGauge, c.settingChangeUnrecorded, c.roomTooHumid],
  unjoined_open: [c.excessPowderOnRing, c.closingPressure, c.ringAlignment, c.augerSpeed, c.shellDimensions, c.settingChangeUnrecorded],
  telescoped: [c.closingPressure, c.ringAlignment, c.shellsTooDry, c.shellDimensions, c.shellMakerChange, c.settingChangeUnrecorded, c.roomTooDry],
  double_cap: [c.ringNotCleared, c.interlockStop, c.vacuumTooLow, c.visualCheckMissed],
  powder_outside: [c.excessPowderOnRing, c.noDedusting, c.augerSpeed, c.closingPressure, c.powderFlow, c.visualCheckMissed, c.roomCleanliness],
  foreign_matter: [c.cleaning, c.wearParts, c.incomingMaterial, c.gowning, c.roomCleanliness, c.visualCheckMissed],
  mix_up: [c.lineClearance, c.wrongLotIssued, c.identityCheck, c.sharedRoom, c.ringNotCleared],
  print_colour: [c.supplierShellDefect, c.incomingInspection, c.wrongLotIssued, c.shellStorageLight],
  shell_bubble_pinhole: [c.supplierShellDefect, c.incomingInspection, c.shellsTooDry, c.shellStorageLight],
};
