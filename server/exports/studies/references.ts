import type { CreateStudyRequest } from '@shared/studies';

interface Reference {
  key: string;
  short: string;
  bibtex: string;
}

/**
 * The published methods a study uses (server/engine/README.md §3–§11). Bibliographic details recalled from
 * memory: check them against the journals before submission.
 */
export const references: Record<string, Reference> = {
  bombelli1987: {
    key: 'bombelli1987',
    short: 'Bombelli, Lee, Meyer and Sorkin 1987',
    bibtex: `@article{bombelli1987,
  author  = {Bombelli, Luca and Lee, Joohan and Meyer, David and Sorkin, Rafael D.},
  title   = {Space-time as a causal set},
  journal = {Physical Review Letters},
  volume  = {59},
  pages   = {521--524},
  year    = {1987},
  doi     = {10.1103/PhysRevLett.59.521}
}`,
  },
  johnston2008: {
    key: 'johnston2008',
    short: 'Johnston 2008',
    bibtex: `@article{johnston2008,
  author  = {Johnston, Steven},
  title   = {Particle propagators on discrete spacetime},
  journal = {Classical and Quantum Gravity},
  volume  = {25},
  pages   = {202001},
  year    = {2008},
  eprint  = {0806.3083},
  archivePrefix = {arXiv}
}`,
  },
  johnston2009: {
    key: 'johnston2009',
    short: 'Johnston 2009',
    bibtex: `@article{johnston2009,
  author  = {Johnston, Steven},
  title   = {Feynman propagator for a free scalar field on a causal set},
  journal = {Physical Review Letters},
  volume  = {103},
  pages   = {180401},
  year    = {2009},
  eprint  = {0909.0944},
  archivePrefix = {arXiv}
}`,
  },
  sorkin2011: {
    key: 'sorkin2011',
    short: 'Sorkin 2011',
    bibtex: `@article{sorkin2011,
  author  = {Sorkin, Rafael D.},
  title   = {Scalar field theory on a causal set in histories form},
  journal = {Journal of Physics: Conference Series},
  volume  = {306},
  pages   = {012017},
  year    = {2011},
  eprint  = {1107.0698},
  archivePrefix = {arXiv}
}`,
  },
  afshordi2012: {
    key: 'afshordi2012',
    short: 'Afshordi, Aslanbeigi and Sorkin 2012',
    bibtex: `@article{afshordi2012,
  author  = {Afshordi, Niayesh and Aslanbeigi, Siavash and Sorkin, Rafael D.},
  title   = {A distinguished vacuum state for a quantum field in a curved spacetime: formalism, features, and cosmology},
  journal = {Journal of High Energy Physics},
  volume  = {2012},
  number  = {08},
  pages   = {137},
  year    = {2012},
  eprint  = {1205.1296},
  archivePrefix = {arXiv}
}`,
  },
  sorkin2012: {
    key: 'sorkin2012',
    short: 'Sorkin 2012',
    bibtex: `@misc{sorkin2012,
  author  = {Sorkin, Rafael D.},
  title   = {Expressing entropy globally in terms of (4D) field-correlations},
  year    = {2012},
  eprint  = {1205.2953},
  archivePrefix = {arXiv}
}`,
  },
  saravani2014: {
    key: 'saravani2014',
    short: 'Saravani, Sorkin and Yazdi 2014',
    bibtex: `@article{saravani2014,
  author  = {Saravani, Mehdi and Sorkin, Rafael D. and Yazdi, Yasaman K.},
  title   = {Spacetime entanglement entropy in 1+1 dimensions},
  journal = {Classical and Quantum Gravity},
  volume  = {31},
  pages   = {214006},
  year    = {2014},
  eprint  = {1311.7146},
  archivePrefix = {arXiv}
}`,
  },
  sorkin2018: {
    key: 'sorkin2018',
    short: 'Sorkin and Yazdi 2018',
    bibtex: `@article{sorkin2018,
  author  = {Sorkin, Rafael D. and Yazdi, Yasaman K.},
  title   = {Entanglement entropy in causal set theory},
  journal = {Classical and Quantum Gravity},
  volume  = {35},
  pages   = {074004},
  year    = {2018},
  eprint  = {1611.10281},
  archivePrefix = {arXiv}
}`,
  },
  calabrese2004: {
    key: 'calabrese2004',
    short: 'Calabrese and Cardy 2004',
    bibtex: `@article{calabrese2004,
  author  = {Calabrese, Pasquale and Cardy, John},
  title   = {Entanglement entropy and quantum field theory},
  journal = {Journal of Statistical Mechanics: Theory and Experiment},
  pages   = {P06002},
  year    = {2004},
  eprint  = {hep-th/0405152},
  archivePrefix = {arXiv}
}`,
  },
  casini2009: {
    key: 'casini2009',
    short: 'Casini and Huerta 2009',
    bibtex: `@article{casini2009,
  author  = {Casini, Horacio and Huerta, Marina},
  title   = {Entanglement entropy in free quantum field theory},
  journal = {Journal of Physics A: Mathematical and Theoretical},
  volume  = {42},
  pages   = {504007},
  year    = {2009},
  eprint  = {0905.2562},
  archivePrefix = {arXiv}
}`,
  },
};

const usesSorkinYazdi = (request: CreateStudyRequest) => request.rules.some((r) => r.doubleTruncation || r.truncation.rule === 'sqrtN');

/** Keys of the references the study's methods rest on, in citation order. */
export function referencesUsed(request: CreateStudyRequest): string[] {
  const keys = ['bombelli1987', 'johnston2008', 'johnston2009', 'sorkin2011', 'afshordi2012', 'sorkin2012', 'saravani2014'];
  if (usesSorkinYazdi(request)) keys.push('sorkin2018');
  keys.push('calabrese2004');
  // the two-interval trend the mutual information is compared with
  if (request.subregions.kind === 'pairs') keys.push('casini2009');
  return keys;
}

/** BibTeX entries of the published methods used. */
export function bibtex(request: CreateStudyRequest): string {
  return (
    `% References for the methods of a Tacet scaling study. Details recalled from memory: check before submission.\n\n` +
    referencesUsed(request).map((k) => references[k]!.bibtex).join('\n\n') +
    '\n'
  );
}
