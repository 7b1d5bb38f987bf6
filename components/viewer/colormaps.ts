/**
 * Quorum's own colour maps for component z-maps over the mean image (our choice, not borrowed):
 * "ember" for positive z (deep rose → salmon → pale gold) and "dusk" for negative z
 * (indigo → violet → lavender). Index 0 is transparent so sub-threshold voxels show the anatomy.
 */
export type ColorMapSpec = { R: number[]; G: number[]; B: number[]; A: number[]; I: number[] };

export const EMBER: ColorMapSpec = {
  R: [0, 150, 232, 250, 255],
  G: [0, 40, 112, 190, 244],
  B: [0, 92, 86, 120, 214],
  A: [0, 255, 255, 255, 255],
  I: [0, 1, 90, 180, 255],
};

export const DUSK: ColorMapSpec = {
  R: [0, 62, 118, 172, 226],
  G: [0, 38, 86, 150, 218],
  B: [0, 140, 214, 245, 255],
  A: [0, 255, 255, 255, 255],
  I: [0, 1, 90, 180, 255],
};

/** CSS gradients of the same maps for the legend. */
export const EMBER_CSS = 'linear-gradient(to right, rgb(150,40,92), rgb(232,112,86), rgb(250,190,120), rgb(255,244,214))';
export const DUSK_CSS = 'linear-gradient(to right, rgb(226,218,255), rgb(172,150,245), rgb(118,86,214), rgb(62,38,140))';

/** Fully transparent: hides one sign of the map (positive only / negative only). */
export const NONE: ColorMapSpec = { R: [0, 0], G: [0, 0], B: [0, 0], A: [0, 0], I: [0, 255] };
