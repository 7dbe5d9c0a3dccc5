/**
 * The covariance recipe's feature maps (recipes/covariance.ts module comment), in a module of
 * their own so the API schema and the client can name them without loading the numerics.
 */
export type CovarianceMap = 'linear' | 'log';
export const COVARIANCE_MAPS: readonly CovarianceMap[] = ['linear', 'log'];
/** Default map of the covariance recipe. */
export const DEFAULT_COVARIANCE_MAP: CovarianceMap = 'linear';
