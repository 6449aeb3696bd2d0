// Discovery: grouping rejected nodes into candidate new classes.
export { discoverCandidates, type Candidate, type CandidateInput, type DiscoveryResult } from './candidates';
export { kmeans, kmeansPlusPlusInit, nearestCentre, type KMeansOptions, type KMeansResult } from './kmeans';
export { meanSilhouette, sampledMeanSilhouette, silhouetteValues, silhouetteValuesAgainstReference } from './silhouette';
export { adjustedRandIndex } from './ari';
export { classTfidfTopTerms, englishStopWords, tokenize, type WeightedTerm } from './ctfidf';
