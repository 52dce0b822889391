-- AlterTable
ALTER TABLE "Lot" ADD COLUMN     "senderAddress" TEXT,
ADD COLUMN     "senderName" TEXT;

-- AlterTable
ALTER TABLE "Unit" ADD COLUMN     "senderAddress" TEXT,
ADD COLUMN     "senderName" TEXT;

-- Hand-written (not in the Prisma model): issued documents are append-only, like trail events. A stored
-- document is the proof of what was issued; regenerating one compares its hash and never overwrites it.
CREATE FUNCTION "document_refuse_change"() RETURNS trigger
LANGUAGE plpgsql AS $$
BEGIN
    RAISE EXCEPTION 'issued documents are append-only' USING HINT = TG_OP || ' on "Document" is refused';
END;
$$;

CREATE TRIGGER "Document_refuse_update_delete" BEFORE UPDATE OR DELETE ON "Document"
    FOR EACH ROW EXECUTE FUNCTION "document_refuse_change"();

CREATE TRIGGER "Document_refuse_truncate" BEFORE TRUNCATE ON "Document"
    FOR EACH STATEMENT EXECUTE FUNCTION "document_refuse_change"();
