import { toRowMajor } from "@recede/core";
import { catchRecedeError } from "@recede/testkit";
import ndarray from "ndarray";
import { describe, expect, it } from "vitest";

// ndarray interop at the API boundary: views from the real `ndarray` package (plain, transposed,
// strided, offset, negative-step) are copied into row-major Float64Array.
const rowMajor = [1, 2, 3, 4, 5, 6]; // 2×3

describe("toRowMajor", () => {
  it("copies a plain 2×3 ndarray view, an array of rows and {data, rows, cols} alike", () => {
    const expected = { data: Float64Array.from(rowMajor), rows: 2, cols: 3 };
    expect(toRowMajor("f", "m", ndarray(Float64Array.from(rowMajor), [2, 3]))).toEqual(expected);
    expect(
      toRowMajor("f", "m", [
        [1, 2, 3],
        [4, 5, 6],
      ]),
    ).toEqual(expected);
    const src = { data: Float64Array.from(rowMajor), rows: 2, cols: 3 };
    const out = toRowMajor("f", "m", src);
    expect(out).toEqual(expected);
    expect(out.data).not.toBe(src.data); // a copy
  });
  it("reads transposed, strided, offset and reversed views through their strides", () => {
    const base = ndarray(Float64Array.from(rowMajor), [2, 3]);
    expect(Array.from(toRowMajor("f", "m", base.transpose(1, 0)).data)).toEqual([1, 4, 2, 5, 3, 6]);
    expect(Array.from(toRowMajor("f", "m", base.step(1, 2)).data)).toEqual([1, 3, 4, 6]);
    expect(Array.from(toRowMajor("f", "m", base.lo(1, 1)).data)).toEqual([5, 6]);
    expect(Array.from(toRowMajor("f", "m", base.step(-1, -1)).data)).toEqual([6, 5, 4, 3, 2, 1]);
    // A column-major buffer viewed with explicit strides.
    const colMajor = ndarray(new Float64Array([1, 4, 2, 5, 3, 6]), [2, 3], [1, 2], 0);
    expect(Array.from(toRowMajor("f", "m", colMajor).data)).toEqual(rowMajor);
    // Plain JS arrays as ndarray data work too.
    expect(Array.from(toRowMajor("f", "m", ndarray([1, 2, 3, 4], [2, 2])).data)).toEqual([
      1, 2, 3, 4,
    ]);
  });
  it("checks shape and finiteness with typed errors naming function and argument", () => {
    catchRecedeError(() => toRowMajor("solve", "A", ndarray(new Float64Array(6), [2, 3]), 3, 3), {
      code: "dimension",
      fn: "solve",
      arg: "A",
      message: '(got "shape 2×3")',
    });
    catchRecedeError(() => toRowMajor("solve", "A", ndarray(new Float64Array(6), [6])), {
      code: "dimension",
      arg: "A.shape",
    });
    catchRecedeError(() => toRowMajor("solve", "A", [[1, 2], [3]]), {
      code: "dimension",
      arg: "A",
    });
    catchRecedeError(
      () => toRowMajor("solve", "A", ndarray(new Float64Array([1, Number.NaN, 0, 1]), [2, 2])),
      {
        code: "non-finite",
        arg: "A[0][1]",
      },
    );
    catchRecedeError(
      () => toRowMajor("solve", "A", { data: new Float64Array(5), rows: 2, cols: 3 }),
      {
        code: "dimension",
        arg: "A",
      },
    );
    catchRecedeError(() => toRowMajor("solve", "A", 42 as never), { code: "type", arg: "A" });
  });
});
