"""The job: project.toml, revisions, reviews, results, and a job loaded once (load.load_job)."""
