import { klDiagonalGaussian, klGaussian } from "@recede/core";
import { catchRecedeError } from "@recede/testkit";
import { describe, expect, it } from "vitest";

describe("klDiagonalGaussian / klGaussian typed errors", () => {
  it("name the function, the argument, what was expected and what was given", () => {
    catchRecedeError(() => klDiagonalGaussian([0], [0], [0], [1]), {
      code: "domain",
      fn: "klDiagonalGaussian",
      arg: "variance0[0]",
    });
    catchRecedeError(() => klDiagonalGaussian([0, 1], [1], [0], [1]), {
      code: "dimension",
      fn: "klDiagonalGaussian",
      arg: "variance0",
    });
    catchRecedeError(() => klDiagonalGaussian([Number.NaN], [1], [0], [1]), {
      code: "non-finite",
      arg: "mean0[0]",
    });
    catchRecedeError(
      () =>
        klGaussian(
          [0, 0],
          [
            [1, 2],
            [2, 1],
          ],
          [0, 0],
          [
            [1, 0],
            [0, 1],
          ],
        ),
      { code: "not-spd", fn: "klGaussian", arg: "cov0" },
    );
    catchRecedeError(
      () =>
        klGaussian(
          [0, 0],
          [
            [1, 0],
            [0, 1],
          ],
          [0, 0],
          [
            [1, 0.3],
            [0, 1],
          ],
        ),
      { code: "not-spd", arg: "cov1", message: "symmetric" },
    );
    catchRecedeError(
      () =>
        klGaussian(
          [0, 0],
          new Float64Array(3),
          [0, 0],
          [
            [1, 0],
            [0, 1],
          ],
        ),
      { code: "dimension", arg: "cov0" },
    );
    catchRecedeError(
      () =>
        klGaussian(
          [0, 0],
          [
            [1, 0],
            [0, 1],
          ],
          [0],
          [
            [1, 0],
            [0, 1],
          ],
        ),
      { code: "dimension", arg: "mean1" },
    );
  });
  it("is zero for identical Gaussians and exact for a textbook case", () => {
    expect(
      klGaussian(
        [1, 2],
        [
          [2, 0.5],
          [0.5, 1],
        ],
        [1, 2],
        [
          [2, 0.5],
          [0.5, 1],
        ],
      ),
    ).toBe(0);
    // The klGaussian doc example: tr = 1, quadratic = ½, k = 2, ln det ratio = 2 ln 2.
    expect(
      klGaussian(
        [0, 0],
        [
          [1, 0],
          [0, 1],
        ],
        [1, 0],
        [
          [2, 0],
          [0, 2],
        ],
      ),
    ).toBeCloseTo(0.5 * (1 + 0.5 - 2 + 2 * Math.LN2), 15);
    // ½(1/2 + 0 − 1 + ln 2) for N(0,1) ‖ N(0,2).
    expect(klDiagonalGaussian([0], [1], [0], [2])).toBeCloseTo(0.5 * (0.5 - 1 + Math.LN2), 15);
  });
});
