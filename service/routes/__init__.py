"""One APIRouter per file."""
