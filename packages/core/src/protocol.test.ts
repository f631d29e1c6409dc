import { ObserverList, type RoundRecord } from "@recede/core";
import { describe, expect, it } from "vitest";

const record: RoundRecord = {
  round: 1,
  decision: new Float64Array(1),
  loss: 0,
  gradient: undefined,
  lossObject: undefined,
};

describe("ObserverList", () => {
  it("calls listeners in order; removers work once and only for their own listener", () => {
    const list = new ObserverList();
    const calls: string[] = [];
    const offA = list.add(() => calls.push("a"));
    list.add(() => calls.push("b"));
    const offA2 = list.add(() => calls.push("a2"));
    expect(list.active).toBe(true);
    list.emit(record);
    offA();
    offA(); // second call is a no-op
    list.emit(record);
    offA2();
    list.emit(record);
    expect(calls).toEqual(["a", "b", "a2", "b", "a2", "b"]);
  });

  it("a listener that removes itself (or adds another) during emit does not disturb that emit", () => {
    const list = new ObserverList();
    const calls: string[] = [];
    const off1 = list.add(() => {
      calls.push("1");
      off1();
      list.add(() => calls.push("late"));
    });
    list.add(() => calls.push("2"));
    list.emit(record);
    expect(calls).toEqual(["1", "2"]);
    list.emit(record);
    expect(calls).toEqual(["1", "2", "2", "late"]);
  });

  it("is inactive when empty", () => {
    const list = new ObserverList();
    const off = list.add(() => {});
    off();
    expect(list.active).toBe(false);
  });
});
