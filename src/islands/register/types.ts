/** Props the register page hands its islands (serialisable). */
export interface Option {
  value: string;
  label: string;
}

export interface SchoolOption {
  id: string;
  name: string;
  blocks: { id: string; name: string }[];
}

export interface RegisterOptions {
  uses: Option[];
  ventilationTypes: Option[];
  ageGroups: Option[];
  windowTypes: Option[];
  phases: Option[];
  climateRegions: Option[];
  constructionTypes: Option[];
  frameMaterials: Option[];
  heatingFuels: Option[];
  /** Register fields with their template headers, for the column-mapping step. */
  fields: Option[];
}

export interface RegisterPermissions {
  canCreate: boolean;
  canUpdate: boolean;
  canDelete: boolean;
  canImport: boolean;
  canExport: boolean;
}
