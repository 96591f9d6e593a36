/** Creating a rig (app/routes/rigs.tsx). */
import { z } from "zod";

export const rigNameSchema = z
  .string({ error: "Name the rig." })
  .trim()
  .min(1, "Name the rig, e.g. the van's or the boat's name.")
  .max(80, "Keep the name under 80 characters.");

export const createRigFormSchema = z.object({ name: rigNameSchema });
