// The caution texts live in lib/cautions.ts, shared by every screen and paper; rulebooks use them under these names.
export { GENERAL_CAUTION as CAUTION, LEAK_HANDLING } from "@/lib/cautions";
