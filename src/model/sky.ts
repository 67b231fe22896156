/** Areas on the sky: the constants every module that converts an area uses. */

/** Square degrees in the whole sky: 4 pi sr times (180/pi)^2 deg^2/sr. */
export const FULL_SKY_DEG2 = 4 * Math.PI * (180 / Math.PI) ** 2;

/** Steradians per square degree, (pi/180)^2. */
export const SR_PER_DEG2 = (Math.PI / 180) ** 2;

/** Smallest survey area, deg^2 (a few arcsec on a side: smaller fields hold no galaxy worth counting). */
export const MIN_AREA_DEG2 = 1e-6;
