// Reference sheet §7, in our own words. Every screen that ranks a finding or recommends an action shows it.

/** Short form of the safety caution, for tight spaces. */
export const SAFETY_CAUTION_SHORT =
  'Bands are guidance, not an instruction to approach, open, switch or operate equipment. Follow your site’s electrical safety programme and local codes.'

/** The full safety caution, one point per entry. */
export const SAFETY_CAUTION: readonly string[] = [
  'Scanning from outside the restricted approach boundary with doors and covers closed needs no arc-flash PPE (NFPA 70E). Whoever opens a cover or door wears arc-rated PPE chosen by the arc-flash risk assessment. Know the limited, restricted and arc-flash boundaries before you start.',
  'Use IR windows or viewing grilles where they are fitted, and enter their transmission.',
  'In substations work in pairs, keep to switching and access permits, and scan ahead as you approach.',
  'Greybody supports a qualified thermographer and the site’s electrical safety programme; it replaces neither. Defer to local codes and licensed practice.',
  SAFETY_CAUTION_SHORT,
]
