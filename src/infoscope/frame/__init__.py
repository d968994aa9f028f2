"""infoscope.frame"""
