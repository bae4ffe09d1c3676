import { describe, expect, it } from "vitest";
import { listProfiles, layouts, requiredColumns } from "../../../etl/index.js";
import { profileSchema } from "../../../shared/schemas/profiles.js";
import { asFieldErrors, profileProblems, toFormValues, toProfile } from "../../../src/features/admin/profiles/profile-form-values.js";

// The profile form edits lists (columns, code rows) and turns them back into the profile the ETL reads: a
// profile that goes through the form unchanged must come back exactly as it was, for every profile shipped.

const detailOf = (id: string) => {
  const profile = listProfiles().find((p) => p.id === id)!;
  const required = new Set<string>(requiredColumns[profile.kind]);
  return { profile, layout: layouts[profile.kind].map((column) => ({ column, required: required.has(column) })) };
};

describe("the profile form's values", () => {
  it("give back every shipped profile unchanged when nothing is edited", () => {
    for (const p of listProfiles()) {
      const back = profileSchema.parse(toProfile(toFormValues(detailOf(p.id)), p.kind));
      expect(back, p.id).toEqual(p);
      expect(profileProblems(toFormValues(detailOf(p.id)), p.kind).errors, p.id).toEqual({});
    }
  });

  it("name each problem under the field it concerns", () => {
    const v = toFormValues(detailOf("birch-jobs"));
    const serial = v.columns.findIndex((c) => c.column === "serial");
    const cause = v.columns.findIndex((c) => c.column === "cause");
    v.columns[serial].header = "";
    v.columns[cause].header = v.columns.find((c) => c.column === "complaint")!.header;
    v.codes.component.push({ from: v.codes.component[0].from, to: "ENG-CSA-HPLUG" }, { from: "X1", to: "" });
    v.id = "Not A Name";
    const { profile, errors } = profileProblems(v, "jobs");
    expect(profile).toBeNull();
    expect(errors[`columns.${serial}.header`]).toBe("a file must have this column");
    expect(errors[`columns.${cause}.header`]).toMatch(/is already the header of complaint/);
    expect(errors[`codes.component.${v.codes.component.length - 2}.from`]).toMatch(/is in this table twice/);
    expect(errors[`codes.component.${v.codes.component.length - 1}.to`]).toBe("say which Ironledger code it means");
    expect(errors.id).toMatch(/lower-case letters, digits and hyphens/);
  });

  it("accept a missing shop column when a default shop is given, and drop blank code rows", () => {
    const v = toFormValues(detailOf("generic-jobs"));
    v.columns.find((c) => c.column === "shop_code")!.header = "";
    expect(profileProblems(v, "jobs").errors).toHaveProperty(`columns.0.header`);
    v.defaultShop = "s1";
    v.codes.payType.push({ from: " ", to: "" });
    const { profile, errors } = profileProblems(v, "jobs");
    expect(errors).toEqual({});
    expect(profile?.defaultShop).toBe("S1");
    expect(profile?.columns.shop_code).toBeUndefined();
    expect(profile?.codes.payType).toEqual({});
  });

  it("nest as react-hook-form expects", () => {
    expect(asFieldErrors({ "columns.2.header": "x", description: "y" })).toEqual({
      columns: [undefined, undefined, { header: { type: "validate", message: "x" } }],
      description: { type: "validate", message: "y" },
    });
  });
});
