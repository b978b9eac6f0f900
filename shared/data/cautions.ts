// The usual cautions for the hazards of halogenation practicals. They remind; they do not
// replace the institution's chemical hygiene plan, the supplier's safety data sheet or local codes.
export type HazardKey =
  | 'chlorine'
  | 'sulfuryl-chloride'
  | 'bromine'
  | 'azo-initiator'
  | 'n-bromosuccinimide'
  | 'halogenated-waste'
  | 'light-source'

export interface Caution {
  key: HazardKey
  title: string
  points: string[]
  /** Where the numbers come from, when there are numbers. */
  source?: string
}

export const CAUTIONS: Record<HazardKey, Caution> = {
  'chlorine': {
    key: 'chlorine',
    title: 'Chlorine gas',
    points: [
      'Toxic and corrosive to eyes and airways. Generate, dispense and react it only in a working fume hood.',
      'Lead off-gas through a trap (for example dilute sodium hydroxide or thiosulfate) so no Cl2 or HCl reaches the room.',
      'Exposure limits: OSHA PEL 1 ppm (ceiling); NIOSH REL 0.5 ppm (15-minute ceiling); IDLH 10 ppm.',
    ],
    source: 'OSHA and NIOSH exposure limits for chlorine (NIOSH Pocket Guide)',
  },
  'sulfuryl-chloride': {
    key: 'sulfuryl-chloride',
    title: 'Sulfuryl chloride',
    points: [
      'Corrosive; reacts violently with water, releasing HCl and SO2. Keep it, its glassware and its syringes dry.',
      'Handle in the fume hood with a gas trap for HCl and SO2 on the apparatus.',
      'Quench residues slowly into a large volume of cold water or bicarbonate in the hood, never the reverse.',
    ],
  },
  'bromine': {
    key: 'bromine',
    title: 'Bromine',
    points: [
      'Highly toxic, corrosive liquid with a dense, heavy vapour; causes severe burns. Fume hood, heavy gloves and face protection.',
      'Keep sodium thiosulfate solution at hand to neutralise spills and drips.',
    ],
  },
  'azo-initiator': {
    key: 'azo-initiator',
    title: 'Azo initiators (AIBN)',
    points: [
      'Decomposes on warming, releasing nitrogen and toxic products; can self-heat in bulk. Store cold, away from heat and light.',
      'Weigh only what the run needs; never heat the solid on its own.',
    ],
  },
  'n-bromosuccinimide': {
    key: 'n-bromosuccinimide',
    title: 'N-Bromosuccinimide',
    points: ['Irritant and oxidiser; store cool and dry, away from reducing agents.'],
  },
  'halogenated-waste': {
    key: 'halogenated-waste',
    title: 'Halogenated waste',
    points: [
      'Collect halogenated organic waste in its own labelled container, separate from non-halogenated solvents and from aqueous waste.',
      'Neutralised aqueous washes go to the container your safety staff name for them.',
    ],
  },
  'light-source': {
    key: 'light-source',
    title: 'Lamps for photochemical initiation',
    points: ['Shield UV lamps; never look at them directly. Keep flammable solvents away from hot lamp housings.'],
  },
}

export const CAUTION_DEFERRAL =
  'These are reminders, not a procedure. Follow your institution\u2019s chemical hygiene plan, the supplier\u2019s safety data sheet, local codes and your safety staff.'

/** The cautions that go with a method's reagents (by data-file id or database reagent key). */
export function cautionsForMethod(methodId: string): HazardKey[] {
  switch (methodId) {
    case 'cl2-light': return ['chlorine', 'light-source', 'halogenated-waste']
    case 'so2cl2-aibn':
    case 'so2cl2-azo': return ['sulfuryl-chloride', 'azo-initiator', 'halogenated-waste']
    case 'br2-light': return ['bromine', 'light-source', 'halogenated-waste']
    case 'nbs-aibn':
    case 'nbs': return ['n-bromosuccinimide', 'azo-initiator', 'halogenated-waste']
    default: return ['halogenated-waste']
  }
}
