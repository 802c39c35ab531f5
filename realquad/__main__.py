"""``python -m realquad`` runs the command line."""

from realquad_cli.main import run

if __name__ == "__main__":
    run()
