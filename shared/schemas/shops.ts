import { z } from "zod";

export const shopSchema = z.object({
  code: z.string(),
  name: z.string(),
  region: z.string().nullable(),
  town: z.string().nullable(),
  climateZone: z.string().nullable(),
  timeZone: z.string().nullable(),
});
export type Shop = z.infer<typeof shopSchema>;
export const shopListSchema = z.object({ shops: z.array(shopSchema) });
export type ShopList = z.infer<typeof shopListSchema>;
