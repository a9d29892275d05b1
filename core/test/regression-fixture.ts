// A small deterministic data set (30 points, a bent curve plus uneven scatter) shared by tests that
// compare our fits with values computed in R. Test support only; not used by the product.
export const R_CHECK_X: readonly number[] = [0,0.0345,0.069,0.1034,0.1379,0.1724,0.2069,0.2414,0.2759,0.3103,0.3448,0.3793,0.4138,0.4483,0.4828,0.5172,0.5517,0.5862,0.6207,0.6552,0.6897,0.7241,0.7586,0.7931,0.8276,0.8621,0.8966,0.931,0.9655,1];
export const R_CHECK_Y: readonly number[] = [3,3.3846,3.6683,3.6665,3.5998,3.3304,3.2879,3.2531,3.5495,3.7995,4.1103,4.1962,4.0764,3.8666,3.4784,3.4246,3.223,3.6086,3.534,3.9988,3.5754,3.7326,2.9048,2.9828,2.2468,2.6503,2.2519,2.8005,2.3799,2.5442];
