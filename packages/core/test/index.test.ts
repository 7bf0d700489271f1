import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import * as core from "../src/index.ts";

// The public API of @skewsmith/core. A change here is a change of the API: make it on purpose.
const CORE_VALUES = [
  "LIMITS",
  "ROUNDINGS",
  "HALF_TURNS",
  "EDGES",
  "EASINGS",
  "EFFECT_FORMAT",
  "EFFECT_DEFAULTS",
  "EffectError",
  "checkEffect",
  "parseEffect",
  "angleTrack",
  "normalizeDegrees",
  "frameAngle",
  "coefficients",
  "roundHalfAway",
  "signedRange",
  "shift",
  "rowShifts",
  "columnShifts",
  "ELEMENT_TYPES",
  "ELEMENT_RANGES",
  "elementType",
  "compileFrame",
  "compileShifts",
  "compileTables",
  "frameDiagnostics",
  "diagnoseFrames",
  "DIAGNOSTICS_REQUEST",
  "DIAGNOSTICS_RESULT",
  "DIAGNOSTICS_ERROR",
  "diagnosticsRequest",
  "handleDiagnosticsRequest",
  "serveDiagnostics",
  "requestDiagnostics",
  "splitFrames",
  "mergeDiagnostics",
  "TABLES_FORMAT",
  "tablesDocument",
  "tablesText",
  "Renderer",
  "renderImage",
  "imagePlane",
  "imageFromPlane",
  "opaqueMask",
  "placeImage",
  "decodePng",
  "encodePng",
  "pngHeader",
  "PngError",
  "canvasFit",
];

const EXPORTER_VALUES = [
  "exportBundle",
  "EXPORT_MAX_BYTES",
  "resolveExportOptions",
  "EXPORT_OUTPUTS",
  "EXPORT_DEFAULTS",
  "SIGNS",
  "ELEMENT_CHOICES",
  "REGISTER_BITS",
  "ExportOptionError",
  "checkLabel",
  "labelFromName",
  "LABEL_MAX_LENGTH",
  "LABEL_ALLOWED",
  "exportBudget",
  "budgetFromTables",
  "budgetText",
  "BUDGET_OPTIONS",
  "exportLayout",
  "layoutFromTables",
  "placeTables",
  "STORAGE_TYPES",
  "STORAGE",
  "outputFiles",
  "cHeader",
  "cSource",
  "ca65Source",
  "m68kSource",
  "armSource",
  "z80Source",
  "binaryExport",
  "tablesJson",
  "runtimeSource",
];

const CORE_TYPES = [
  "Rounding",
  "HalfTurn",
  "Edges",
  "Easing",
  "Bits",
  "Effect",
  "AngleTrack",
  "Sweep",
  "EffectIssue",
  "FrameAngle",
  "Coefficients",
  "ShiftRule",
  "ElementType",
  "FrameTables",
  "CompiledFrame",
  "CompiledTables",
  "CompileOptions",
  "FrameDiagnostics",
  "FrameRange",
  "FramesDiagnostics",
  "DiagnosticsRequest",
  "DiagnosticsResult",
  "DiagnosticsError",
  "DiagnosticsResponse",
  "DiagnosticsReply",
  "DiagnosticsEndpoint",
  "DiagnosticsPort",
  "TablesDocument",
  "TablesDocumentFrame",
  "PixelData",
  "Plane",
  "FrameShifts",
  "RenderGeometry",
  "PassNumber",
  "Image",
  "IndexedImage",
  "RgbaImage",
  "Rgba",
  "PngHeader",
  "CanvasFit",
  "CanvasFitOptions",
  "Sides",
];

const EXPORTER_TYPES = [
  "ExportBundle",
  "BundleFile",
  "BundleProgress",
  "ExportOptions",
  "ExportOptionsInput",
  "ExportOutput",
  "Sign",
  "ElementChoice",
  "BudgetReport",
  "BudgetTable",
  "BudgetOutput",
  "BudgetOption",
  "ExportLayout",
  "LayoutTable",
  "LayoutConstant",
  "TablePlan",
  "TablePlacement",
  "TableRole",
  "TablePart",
  "StorageType",
  "StorageTypeName",
  "ByteOrder",
];

const source = readFileSync(new URL("../src/index.ts", import.meta.url), "utf8");

describe("the public API (src/index.ts)", () => {
  it("exports exactly these values", () => {
    expect(Object.keys(core).sort()).toEqual([...CORE_VALUES, ...EXPORTER_VALUES].sort());
  });

  it("exports exactly these types", () => {
    const types = [...source.matchAll(/^export type \{([^}]*)\}/gm)].flatMap((m) =>
      m[1]
        .split(",")
        .map((s) => s.trim())
        .filter(Boolean),
    );
    expect(types.sort()).toEqual([...CORE_TYPES, ...EXPORTER_TYPES].sort());
  });

  it("only re-exports named exports from its modules", () => {
    const lines = source.split("\n").filter((l) => l.trim() !== "" && !l.trim().startsWith("//"));
    for (const line of lines) expect(line).toMatch(/^export (type )?\{[^}]+\} from "\.\/[\w/]+\.ts";$/);
  });
});
