import { InternalError } from '../errors.ts';

/**
 * The works Lacuna's reports cite: one list, used by the methods paragraph (which cites by
 * key) and the BibTeX download. A DOI is given only where it was checked against several
 * independent citing sources; otherwise none is given (no guessed DOIs).
 */

export interface Work {
  key: string;
  type: 'article' | 'book' | 'misc';
  /** "Family, Given" forms, in order. */
  authors: string[];
  year: number;
  title: string;
  journal?: string;
  volume?: string;
  number?: string;
  pages?: string;
  publisher?: string;
  address?: string;
  doi?: string;
  /** For `misc`: how it was published. */
  howpublished?: string;
  /** How the text cites it: "Vinje & Gallant 2000". */
  short: string;
}

const LIST: Work[] = [
  { key: 'treves1991', type: 'article', authors: ['Treves, Alessandro', 'Rolls, Edmund T.'], year: 1991, title: 'What determines the capacity of autoassociative memories in the brain?', journal: 'Network: Computation in Neural Systems', volume: '2', number: '4', pages: '371–397', short: 'Treves & Rolls 1991' },
  { key: 'rolls1995', type: 'article', authors: ['Rolls, Edmund T.', 'Tovee, Martin J.'], year: 1995, title: 'Sparseness of the neuronal representation of stimuli in the primate temporal visual cortex', journal: 'Journal of Neurophysiology', volume: '73', number: '2', pages: '713–726', short: 'Rolls & Tovee 1995' },
  { key: 'vinje2000', type: 'article', authors: ['Vinje, William E.', 'Gallant, Jack L.'], year: 2000, title: 'Sparse coding and decorrelation in primary visual cortex during natural vision', journal: 'Science', volume: '287', number: '5456', pages: '1273–1276', doi: '10.1126/science.287.5456.1273', short: 'Vinje & Gallant 2000' },
  { key: 'willmore2001', type: 'article', authors: ['Willmore, Ben', 'Tolhurst, David J.'], year: 2001, title: 'Characterizing the sparseness of neural codes', journal: 'Network: Computation in Neural Systems', volume: '12', number: '3', pages: '255–270', short: 'Willmore & Tolhurst 2001' },
  { key: 'hoyer2004', type: 'article', authors: ['Hoyer, Patrik O.'], year: 2004, title: 'Non-negative matrix factorization with sparseness constraints', journal: 'Journal of Machine Learning Research', volume: '5', pages: '1457–1469', short: 'Hoyer 2004' },
  { key: 'hurley2009', type: 'article', authors: ['Hurley, Niall', 'Rickard, Scott'], year: 2009, title: 'Comparing measures of sparsity', journal: 'IEEE Transactions on Information Theory', volume: '55', number: '10', pages: '4723–4741', short: 'Hurley & Rickard 2009' },
  { key: 'joanes1998', type: 'article', authors: ['Joanes, Derrick N.', 'Gill, Christine A.'], year: 1998, title: 'Comparing measures of sample skewness and kurtosis', journal: 'Journal of the Royal Statistical Society: Series D (The Statistician)', volume: '47', number: '1', pages: '183–189', doi: '10.1111/1467-9884.00122', short: 'Joanes & Gill 1998' },
  { key: 'efron1987', type: 'article', authors: ['Efron, Bradley'], year: 1987, title: 'Better bootstrap confidence intervals', journal: 'Journal of the American Statistical Association', volume: '82', number: '397', pages: '171–185', doi: '10.1080/01621459.1987.10478410', short: 'Efron 1987' },
  { key: 'efron1993', type: 'book', authors: ['Efron, Bradley', 'Tibshirani, Robert J.'], year: 1993, title: 'An Introduction to the Bootstrap', publisher: 'Chapman & Hall', address: 'New York', short: 'Efron & Tibshirani 1993' },
  { key: 'kunsch1989', type: 'article', authors: ['Künsch, Hans R.'], year: 1989, title: 'The jackknife and the bootstrap for general stationary observations', journal: 'The Annals of Statistics', volume: '17', number: '3', pages: '1217–1241', doi: '10.1214/aos/1176347265', short: 'Künsch 1989' },
  { key: 'politis2004', type: 'article', authors: ['Politis, Dimitris N.', 'White, Halbert'], year: 2004, title: 'Automatic block-length selection for the dependent bootstrap', journal: 'Econometric Reviews', volume: '23', number: '1', pages: '53–70', doi: '10.1081/ETC-120028836', short: 'Politis & White 2004' },
  { key: 'patton2009', type: 'article', authors: ['Patton, Andrew', 'Politis, Dimitris N.', 'White, Halbert'], year: 2009, title: 'Correction to “Automatic block-length selection for the dependent bootstrap” by D. Politis and H. White', journal: 'Econometric Reviews', volume: '28', number: '4', pages: '372–375', doi: '10.1080/07474930802459016', short: 'Patton, Politis & White 2009' },
  { key: 'roberts1959', type: 'article', authors: ['Roberts, S. W.'], year: 1959, title: 'Control chart tests based on geometric moving averages', journal: 'Technometrics', volume: '1', number: '3', pages: '239–250', short: 'Roberts 1959' },
  { key: 'page1954', type: 'article', authors: ['Page, E. S.'], year: 1954, title: 'Continuous inspection schemes', journal: 'Biometrika', volume: '41', number: '1/2', pages: '100–115', short: 'Page 1954' },
  { key: 'gilbert1987', type: 'book', authors: ['Gilbert, Richard O.'], year: 1987, title: 'Statistical Methods for Environmental Pollution Monitoring', publisher: 'Van Nostrand Reinhold', address: 'New York', short: 'Gilbert 1987' },
  { key: 'theil1950', type: 'article', authors: ['Theil, Henri'], year: 1950, title: 'A rank-invariant method of linear and polynomial regression analysis, I, II and III', journal: 'Proceedings of the Koninklijke Nederlandse Akademie van Wetenschappen', volume: '53', pages: '386–392, 521–525, 1397–1412', short: 'Theil 1950' },
  { key: 'sen1968', type: 'article', authors: ['Sen, Pranab Kumar'], year: 1968, title: 'Estimates of the regression coefficient based on Kendall’s tau', journal: 'Journal of the American Statistical Association', volume: '63', number: '324', pages: '1379–1389', short: 'Sen 1968' },
  { key: 'holm1979', type: 'article', authors: ['Holm, Sture'], year: 1979, title: 'A simple sequentially rejective multiple test procedure', journal: 'Scandinavian Journal of Statistics', volume: '6', number: '2', pages: '65–70', short: 'Holm 1979' },
  { key: 'benjamini1995', type: 'article', authors: ['Benjamini, Yoav', 'Hochberg, Yosef'], year: 1995, title: 'Controlling the false discovery rate: a practical and powerful approach to multiple testing', journal: 'Journal of the Royal Statistical Society: Series B (Methodological)', volume: '57', number: '1', pages: '289–300', short: 'Benjamini & Hochberg 1995' },
  { key: 'okabe2008', type: 'misc', authors: ['Okabe, Masataka', 'Ito, Kei'], year: 2008, title: 'Color Universal Design (CUD): How to make figures and presentations that are friendly to colorblind people', howpublished: 'Web document, J*Fly data depository for Drosophila researchers', short: 'Okabe & Ito 2008' },
  { key: 'wong2011', type: 'article', authors: ['Wong, Bang'], year: 2011, title: 'Points of view: Color blindness', journal: 'Nature Methods', volume: '8', number: '6', pages: '441', short: 'Wong 2011' },
];

/** Every work, by key. */
export const WORKS: Readonly<Record<string, Work>> = Object.freeze(Object.fromEntries(LIST.map((w) => [w.key, w])));

/** Keys in the list's order (also the BibTeX order). */
export const WORK_KEYS: readonly string[] = LIST.map((w) => w.key);

/** The in-text form of one or more keys: "Künsch 1989; Politis & White 2004". Unknown keys throw. */
export function citeText(...keys: string[]): string {
  return keys
    .map((k) => {
      const w = WORKS[k];
      if (!w) throw new InternalError(`unknown citation key ${JSON.stringify(k)}`);
      return w.short;
    })
    .join('; ');
}
