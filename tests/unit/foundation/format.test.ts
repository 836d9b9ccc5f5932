import { describe, expect, it } from "vitest";
import { concise, coreHours } from "@/lib/format";

describe("concise error notation", () => {
  it("writes two significant digits of the error in parentheses", () => {
    expect(concise(-1.22234, 0.00141)).toBe("−1.2223(14)");
    expect(concise(0.5, 0.0123)).toBe("0.500(12)");
    expect(concise(2.269, 0.0005)).toBe("2.26900(50)");
  });
  it("rounds an error that carries into a third digit to two", () => {
    expect(concise(1.0, 0.000996)).toBe("1.0000(10)");
  });
  it("keeps integer places for large errors", () => {
    expect(concise(1234.4, 23.4)).toBe("1234(23)");
    expect(concise(98765.4, 1234)).toBe("98800(1200)");
  });
  it("falls back to the plain value without a usable error", () => {
    expect(concise(3.25, 0)).toBe("3.25");
  });
  it("core-hours get thousands separators", () => {
    expect(coreHours(250000)).toBe("250,000");
  });
});
