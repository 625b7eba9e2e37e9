#json: the review of the demo recipes, item by item
run bath-saline.ionmix
run k-pipette.ionmix
run cs-pipette.ionmix
review k-pipette bath
review cs-pipette bath
