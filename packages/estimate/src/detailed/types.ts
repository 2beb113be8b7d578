/**
 * Shapes of the detailed-model fit: which extensions of the lumped model are in, and how θ is laid
 * out. Internal to `@motorprint/estimate` except `ModelExtensions`, which callers pass.
 */

/**
 * Extensions of the lumped linear model a fit may include. Each adds constants:
 * `coulomb` Tc [N·m]; `stiction` Ts [N·m] (breakaway, ≥ Tc; needs `coulomb`); `drag` c
 * [N·m·s²/rad²] of c·ω|ω|; `voltageLimit` Vmax [V] and `currentLimit` Imax [A] of a drive whose
 * command was logged; `heating` R20 [Ω] with Rth [K/W] and Cth [J/K] (copper law, first-order
 * thermal model).
 */
export interface ModelExtensions {
  coulomb?: boolean;
  stiction?: boolean;
  drag?: boolean;
  voltageLimit?: boolean;
  currentLimit?: boolean;
  heating?: boolean;
}

/** One entry of θ. */
export interface ThetaEntry {
  /** Name: a constant (`R`, `L`, `K`, `Kt`, `Ke`, `J`, `b`, `Tc`, `Ts`, `c`, `Vmax`, `Imax`, `Rth`, `Cth`) or a nuisance (`level 2 run.csv`). */
  name: string;
  /** `log`: value = e^θ (positive constants); `linear`: value = θ·scale. */
  transform: 'log' | 'linear';
  /** Scale of a linear entry (its typical size), 1 for log entries. */
  scale: number;
  /** Recording index of a nuisance, −1 for a constant shared by all recordings. */
  recording: number;
  /** A forward-difference step of its own on θ (a secant), where the default one is too small for the entry's effect. @default the problem's */
  step?: number;
}
