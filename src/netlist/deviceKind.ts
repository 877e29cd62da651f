/** The nonlinear device kinds a netlist expands into, their constants and ports (equations: solver/devices.ts). */

export const enum DeviceKind {
  /** Shockley junction (a diode string): params [Is, m n Vt]. One port anode -> cathode. */
  Junction = 0,
  /** Ebers-Moll transport model: params [Is, n Vt, betaF, betaR, sign (+1 NPN, -1 PNP)]. Ports (b,e) and (b,c). */
  Bjt = 1,
  /** Shichman-Hodges square law: params [Idss, Vp (< 0), lambda, sign (+1 n, -1 p)]. Ports (g,s) (no current) and (d,s). */
  Jfet = 2,
  /** Op-amp input stage: params [Imax, gm]; i = Imax tanh(gm v / Imax) into the compensation node. */
  InputStage = 3,
  /** Op-amp output's approach to its rails: params [I0, Vlow, Vhigh, Vknee]. */
  RailClamp = 4,
}

/** Ports per device kind. */
export const PORT_COUNT: Readonly<Record<DeviceKind, number>> = {
  [DeviceKind.Junction]: 1,
  [DeviceKind.Bjt]: 2,
  [DeviceKind.Jfet]: 2,
  [DeviceKind.InputStage]: 1,
  [DeviceKind.RailClamp]: 1,
};
