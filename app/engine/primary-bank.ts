/**
 * The one rule for "the primary bank" (the headline on Now, the budget page, the API and
 * alerts): the first bank with the role "house", else the first bank of the model.
 */
import type { Bank, RigModel } from "./model";

export function primaryBank(model: RigModel): Bank {
  return model.banks.find((b) => b.role === "house") ?? model.banks[0]!;
}

export function primaryBankId(model: RigModel): string {
  return primaryBank(model).id;
}
