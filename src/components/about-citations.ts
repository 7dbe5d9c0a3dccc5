/**
 * Sources the About page cites. The methods are those of DESIGN.md ("The decoder"); the full
 * references follow ../shared/REFERENCES.md where it lists them. CSP and shrinkage LDA (the
 * baselines) are not in REFERENCES.md: those two entries are from memory, unchecked. The dataset
 * paper is cited by authors, year and journal, as the dataset's README gives it.
 */
export interface Citation {
  use: string;
  text: string;
}

export const DATASET_CITATIONS: Citation[] = [
  {
    use: 'Dataset',
    text: 'Schalk G, McFarland DJ, Hinterberger T, Birbaumer N, Wolpaw JR (2004). IEEE Trans Biomed Eng 51(6):1034–1043.',
  },
  {
    use: 'Repository',
    text: 'Goldberger AL, Amaral LAN, Glass L, Hausdorff JM, Ivanov PCh, Mark RG, Mietus JE, Moody GB, Peng C-K, Stanley HE (2000). PhysioBank, PhysioToolkit, and PhysioNet: components of a new research resource for complex physiologic signals. Circulation 101(23):e215–e220.',
  },
];

export const METHOD_CITATIONS: Citation[] = [
  { use: 'ICA (extended Infomax)', text: 'Lee TW, Girolami M, Sejnowski TJ (1999). Independent component analysis using an extended infomax algorithm for mixed subgaussian and supergaussian sources. Neural Computation 11(2):417–441.' },
  { use: 'ICA (FastICA)', text: 'Hyvärinen A (1999). Fast and robust fixed-point algorithms for independent component analysis. IEEE Trans Neural Networks 10(3):626–634.' },
  { use: 'Morlet CWT', text: 'Torrence C, Compo GP (1998). A practical guide to wavelet analysis. Bull Am Meteorol Soc 79(1):61–78.' },
  { use: 'Trace-norm classifier', text: 'Tomioka R, Aihara K (2007). Classifying matrices with a spectral regularization. ICML 2007.' },
  { use: 'Trace-norm for EEG', text: 'Tomioka R, Müller KR (2010). A regularized discriminative framework for EEG analysis with application to brain–computer interface. NeuroImage 49(1):415–432.' },
  { use: 'FISTA solver', text: 'Beck A, Teboulle M (2009). A fast iterative shrinkage-thresholding algorithm for linear inverse problems. SIAM J Imaging Sci 2(1):183–202.' },
  { use: 'Nested cross-validation', text: 'Varma S, Simon R (2006). Bias in error estimation when using cross-validation for model selection. BMC Bioinformatics 7:91.' },
  { use: 'Accuracy interval', text: 'Wilson EB (1927). Probable inference, the law of succession, and statistical inference. JASA 22:209–212.' },
  { use: 'Chance level', text: 'Combrisson E, Jerbi K (2015). Exceeding chance level by chance: the caveat of theoretical chance levels in brain signal classification and statistical assessment of decoding accuracy. J Neurosci Methods 250:126–136.' },
  { use: 'Kappa', text: 'Cohen J (1960). A coefficient of agreement for nominal scales. Educ Psychol Meas 20(1):37–46.' },
  { use: 'Information transfer rate', text: 'Wolpaw JR, Birbaumer N, McFarland DJ, Pfurtscheller G, Vaughan TM (2002). Brain–computer interfaces for communication and control. Clin Neurophysiol 113(6):767–791.' },
  { use: 'Baseline: CSP', text: 'Ramoser H, Müller-Gerking J, Pfurtscheller G (2000). Optimal spatial filtering of single trial EEG during imagined hand movement. IEEE Trans Rehabil Eng 8(4):441–446.' },
  { use: 'Baseline: shrinkage LDA', text: 'Ledoit O, Wolf M (2004). A well-conditioned estimator for large-dimensional covariance matrices. J Multivariate Anal 88(2):365–411.' },
];
