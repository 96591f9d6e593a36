/**
 * Resistance of the devices in a circuit (fuses, breakers, switches, BMS contactors and
 * terminations), for the end-to-end voltage drop. A value in the model wins; otherwise a
 * typical default per device kind.
 *
 * Sources of the defaults — TRADE PRACTICE, VALUES FROM MEMORY (no published table was read):
 * - Fuses: about 75 mV cold drop at the rated current (R ≈ 75 mV / I_rated), the order of
 *   magnitude makers' blade and bolt-down fuse datasheets give (10 A blade ≈ 7.5 mΩ, 300 A
 *   class T ≈ 0.25 mΩ). Floor 0.1 mΩ.
 * - Thermal breakers: about twice a fuse of the same rating (R ≈ 150 mV / I_rated).
 * - Battery disconnect or changeover (rotary, heavy contacts): 0.2 mΩ.
 * - Relay or solenoid: 1 mΩ. Panel rocker or toggle switch: 5 mΩ.
 * - BMS contactor: 0.5 mΩ; BMS MOSFET port without contactor: 1 mΩ.
 * - One crimped and bolted termination: 0.1 mΩ; 4 per circuit (two ends, both conductors).
 * BMS controls (enable, reset) carry no load current: 0.
 * Check the makers' data for your parts; these are planning values.
 */
import type { Bank, BankPort, Circuit, Protection, Switch } from "./model";

export const DEFAULT_TERMINATIONS_PER_CIRCUIT = 4;
export const DEFAULT_TERMINATION_MOHM = 0.1;
export const RESISTANCE_SOURCE =
  "Device resistances: the model's values where given, else typical values (trade practice, from memory: fuse ≈ 75 mV / rating, breaker ≈ 150 mV / rating, disconnect 0.2 mΩ, relay 1 mΩ, rocker 5 mΩ, contactor 0.5 mΩ, 0.1 mΩ per termination). Check the makers' datasheets.";

export function protectionMOhm(p: Protection): number {
  if (p.resistanceMOhm !== undefined) return p.resistanceMOhm;
  const mv = p.kind === "fuse" ? 75 : 150;
  return Math.max(0.1, mv / p.ratingA);
}

export function switchMOhm(s: Switch): number {
  if (s.resistanceMOhm !== undefined) return s.resistanceMOhm;
  switch (s.kind) {
    case "disconnect":
    case "changeover":
      return 0.2;
    case "relay":
      return 1;
    case "switch":
      return 5;
    case "enable":
    case "reset":
      return 0;
  }
}

/** The BMS switch in a port; 0 for a bank with no BMS. */
export function portMOhm(bank: Bank, port: BankPort): number {
  if (port.resistanceMOhm !== undefined) return port.resistanceMOhm;
  if (!bank.bms) return 0;
  return port.contactor ? 0.5 : 1;
}

export function terminationsMOhm(c: Circuit): number {
  return (c.terminations ?? DEFAULT_TERMINATIONS_PER_CIRCUIT) * (c.terminationMOhm ?? DEFAULT_TERMINATION_MOHM);
}
