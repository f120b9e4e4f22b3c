// Error catalogue of libs/netcdf: every code this package throws, with what to do about it.
export const NETCDF_ERRORS = Object.freeze({
  REEFD_NETCDF_INVALID:
    'a NetCDF dataset could not be written or read (bad name, shape, size or a damaged file): the message says which',
});
export type NetcdfErrorCode = keyof typeof NETCDF_ERRORS;
