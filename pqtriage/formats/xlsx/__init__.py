"""Workbook output (.xlsx, Office Open XML), written with openpyxl."""
