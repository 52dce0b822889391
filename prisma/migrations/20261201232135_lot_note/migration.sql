-- AlterTable
ALTER TABLE "Lot" ADD COLUMN "note" TEXT;
