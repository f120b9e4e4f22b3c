// Error catalogue of libs/netcdf: every code this package throws, with what to do about it.
import { defineErrors } from '../contract/errors.js';

export const NETCDF_ERRORS = defineErrors('libs/netcdf', {
  REEFD_NETCDF_INVALID:
    'a NetCDF dataset could not be written or read (bad name, shape, size or a damaged file): the message says which',
});
export type NetcdfErrorCode = (typeof NETCDF_ERRORS.codes)[number];
