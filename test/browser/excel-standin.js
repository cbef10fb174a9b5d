// Stand-in for the few host APIs the pane uses, injected before the page's scripts in the
// in-spreadsheet browser test. It records what the pane asks for and lets the test move the
// selection. Nothing here is real office.js.
(() => {
  const fns = {};
  class HostError {
    constructor(code, message) {
      this.code = code;
      this.message = message;
    }
  }
  window.__fns = fns;
  window.CustomFunctions = {
    associate: (id, f) => {
      fns[id] = f;
    },
    Error: HostError,
    ErrorCode: { invalidValue: "#VALUE!", notAvailable: "#N/A", divisionByZero: "#DIV/0!", invalidNumber: "#NUM!" },
  };
  const state = { active: "Sheet1!A1", spill: {}, headers: {}, formulas: {}, written: [], handler: null, calls: [], selected: [], values: {} };
  window.__excel = state;
  function range(address) {
    return {
      address,
      values: state.values[address],
      formulas: [[state.formulas[address] ?? ""]],
      load() {},
      select() {
        state.selected.push(address);
      },
      getSpillParentOrNullObject() {
        const p = state.spill[address];
        return { isNullObject: !p, address: p || "", formulas: [[state.formulas[p] ?? ""]], load() {} };
      },
      getRow() {
        return {
          getOffsetRange() {
            const v = state.headers[address];
            if (!v) throw new Error("no row above");
            return { load() {}, values: v };
          },
        };
      },
    };
  }
  const ctx = {
    workbook: {
      getActiveCell() {
        state.calls.push("getActiveCell");
        return range(state.active);
      },
      worksheets: {
        items: [{ name: "Sheet1" }],
        load() {},
        getItem(name) {
          return { getRange: (local) => range(`${name}!${local}`) };
        },
        add(name) {
          state.written.push({ sheet: name });
          const sh = {
            getRange(a) {
              const r = { format: { font: {} }, select() {} };
              Object.defineProperty(r, "values", { set: (v) => state.written.push({ sheet: name, at: a, values: v }) });
              Object.defineProperty(r, "formulas", { set: (v) => state.written.push({ sheet: name, at: a, formulas: v }) });
              return r;
            },
            activate() {},
          };
          return sh;
        },
      },
    },
    sync: async () => {},
  };
  window.Excel = { run: async (fn) => fn(ctx) };
  window.Office = {
    onReady: () => Promise.resolve({ host: "Excel", platform: "OfficeOnline" }),
    HostType: { Excel: "Excel" },
    EventType: { DocumentSelectionChanged: "documentSelectionChanged" },
    context: {
      requirements: { isSetSupported: (name, version) => name === "ExcelApi" && Number(version) <= 1.12 },
      document: {
        addHandlerAsync(type, h) {
          state.handler = h;
        },
      },
    },
  };
  window.__select = async (address) => {
    state.active = address;
    if (state.handler) state.handler({ type: "documentSelectionChanged" });
  };
})();
