import { XMLParser, XMLValidator } from "fast-xml-parser";
import { InputError } from "../../errors.js";

/**
 * What the CIFTI-2 XML (the NIfTI extension with code 32) says of the matrix:
 * its version and, for each MatrixIndicesMap, the dimensions it applies to,
 * its type (CIFTI_INDEX_TYPE_PARCELS, _BRAIN_MODELS, _SERIES, _SCALARS,
 * _LABELS) and, for parcels, the Name of each Parcel in order (CIFTI-2
 * standard, 2014: <CIFTI Version="2"><Matrix><MatrixIndicesMap
 * AppliesToMatrixDimension="0,1" IndicesMapToDataType="…"><Parcel Name="…">).
 */
export interface CiftiMap {
  /** The matrix dimensions the map applies to (0 runs along a row, 1 along a column). */
  dimensions: number[];
  /** IndicesMapToDataType, e.g. "CIFTI_INDEX_TYPE_PARCELS". */
  type: string;
  /** The Parcel names, in order, for a parcels map. */
  parcels?: string[];
}

export interface CiftiMatrix {
  version: string;
  maps: CiftiMap[];
}

type XmlNode = { "@"?: Record<string, string> } & Record<string, unknown>;

const parser = new XMLParser({
  ignoreAttributes: false,
  attributeNamePrefix: "",
  attributesGroupName: "@",
  parseAttributeValue: false,
  parseTagValue: false,
  trimValues: false,
  // XML's character references (&#233;) as well as its five named entities.
  htmlEntities: true,
  isArray: (name) => name === "Matrix" || name === "MatrixIndicesMap" || name === "Parcel",
  // Vertex and voxel lists can be long and are not needed.
  stopNodes: ["*.Vertices", "*.VoxelIndicesIJK", "*.BrainModel", "*.Volume", "*.MetaData", "*.LabelTable"],
});

function fail(file: string, what: string): never {
  throw new InputError(`the CIFTI-2 XML in the header extension cannot be read: ${what}`, { file });
}

const asNode = (value: unknown): XmlNode | undefined => (value !== null && typeof value === "object" && !Array.isArray(value) ? (value as XmlNode) : undefined);
const asNodes = (value: unknown): XmlNode[] => (Array.isArray(value) ? value.map(asNode).filter((node): node is XmlNode => node !== undefined) : []);

/** The version and the index maps of the CIFTI XML text. */
export function parseCiftiXml(xml: string, file: string): CiftiMatrix {
  const valid = XMLValidator.validate(xml);
  if (valid !== true) fail(file, `${valid.err.msg} (line ${valid.err.line}, column ${valid.err.col} of the XML)`);
  const root = asNode(asNode(parser.parse(xml))?.CIFTI);
  if (!root) fail(file, "it has no <CIFTI> element");
  const version = root["@"]?.Version ?? "";
  const matrix = asNodes(root.Matrix)[0];
  if (!matrix) return { version, maps: [] };
  const maps = asNodes(matrix.MatrixIndicesMap).map((node): CiftiMap => {
    const attributes = node["@"] ?? {};
    const applies = attributes.AppliesToMatrixDimension ?? "";
    const dimensions = applies.split(",").map((part) => Number(part.trim()));
    if (applies.trim() === "" || dimensions.some((d) => !Number.isInteger(d) || d < 0)) {
      fail(file, `a MatrixIndicesMap has AppliesToMatrixDimension="${applies}", not a list of dimensions`);
    }
    const type = attributes.IndicesMapToDataType ?? "";
    const parcels = type === "CIFTI_INDEX_TYPE_PARCELS" ? asNodes(node.Parcel).map((parcel) => parcel["@"]?.Name) : undefined;
    if (parcels?.some((name) => name === undefined)) fail(file, "a <Parcel> has no Name");
    return { dimensions, type, ...(parcels ? { parcels: parcels as string[] } : {}) };
  });
  return { version, maps };
}
