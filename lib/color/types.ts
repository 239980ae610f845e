export type Vec3 = [number, number, number];
/** Linear-light RGB, each channel 0–1 for in-gamut colours. */
export type LinearRgb = Vec3;
/** CIE XYZ scaled so that the reference white has Y = 100. */
export type Xyz = Vec3;
/** CIELAB L*, a*, b*. */
export type Lab = Vec3;
/** CIE LCh(ab): L*, C*ab, hab in degrees 0–360. */
export type Lch = Vec3;
