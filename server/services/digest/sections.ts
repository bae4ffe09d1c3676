import type { SectionSource } from "./section.js";
import { findingsSection } from "./sections/findings.js";
import { flaggedShopsSection } from "./sections/flagged-shops.js";
import { shopPositionSection } from "./sections/shop-position.js";
import { deadlinesSection } from "./sections/deadlines.js";
import { winterSection } from "./sections/winter.js";

/**
 * The digest's sections in the order they read. A section decides who gets it and reads its data in the
 * reader's own scope; a new section is one more module in sections/ and one more entry here.
 */
export const digestSections: readonly SectionSource<any>[] = [findingsSection, flaggedShopsSection, shopPositionSection, winterSection, deadlinesSection];
