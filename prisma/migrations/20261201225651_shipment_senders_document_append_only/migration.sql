-- AlterTable
ALTER TABLE "Lot" ADD COLUMN "senderAddress" TEXT;
ALTER TABLE "Lot" ADD COLUMN "senderName" TEXT;

-- AlterTable
ALTER TABLE "Unit" ADD COLUMN "senderAddress" TEXT;
ALTER TABLE "Unit" ADD COLUMN "senderName" TEXT;

-- Hand-written (not in the Prisma model): issued documents are append-only, like trail events. A stored
-- document is the proof of what was issued; regenerating one compares its hash and never overwrites it.
CREATE TRIGGER "Document_refuse_update" BEFORE UPDATE ON "Document"
BEGIN
    SELECT RAISE(ABORT, 'issued documents are append-only');
END;

CREATE TRIGGER "Document_refuse_delete" BEFORE DELETE ON "Document"
BEGIN
    SELECT RAISE(ABORT, 'issued documents are append-only');
END;
