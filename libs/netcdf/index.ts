// Public API of libs/netcdf: a writer and reader of the NetCDF classic format (CDF-1 and CDF-2).
export {
  charData,
  charStrings,
  decodeNetcdf,
  encodeNetcdf,
  maxByteLength,
  NC_NAME,
  NetcdfError,
  type NcAttribute,
  type NcDataset,
  type NcDimension,
  type NcType,
  type NcVariable,
} from './classic.js';
export { NETCDF_ERRORS, type NetcdfErrorCode } from './errors.js';
